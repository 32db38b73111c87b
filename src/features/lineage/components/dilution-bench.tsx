/**
 * The bench view of a volumetric dilution or calibration-series level (METROLOGY §5.5): nothing is weighed.
 * Huge: what to pipette (planned pipette, its kind and nominal volume, the aliquot in mL) from which parent
 * (identifier and concentration as used) into which flask. Then, in order: 1. record the aliquot (pipette
 * scanned; volume for a piston pipette; a correction supersedes with a reason), 2. make up to volume (the
 * planned flask), 3. the recomputed concentration ± U and the next step (sign "prepared" on the record).
 */
import { MatrixWarningNote } from './matrix-warning.tsx';
import { useState } from 'react';
import { Link } from 'react-router';
import { Button } from '../../../components/ui/button.tsx';
import { Banner, Panel } from '../../../components/ui/feedback.tsx';
import type { Aliquot, LineageSection } from '../../../../shared/schemas/lineage.ts';
import { MakeUpForm } from '../../preparations/components/make-up-form.tsx';
import { formatLabTime, percent } from '../../preparations/format.ts';
import type { PreparationDetail } from '../../preparations/types.ts';
import { useAuth } from '../../auth/use-auth.ts';
import { aliquotFieldsFor, wareKindLabel } from './aliquot-fields.ts';
import { AliquotForm } from './aliquot-form.tsx';
import { HazardCautions } from '../../preparations/components/hazard-cautions.tsx';
import { calibratedVolumeLine } from '../../../../shared/prep/calibrated-volume.ts';

/** The aliquot that counts: the newest one nothing supersedes. */
export function currentAliquot(aliquots: Aliquot[]): Aliquot | undefined {
  return aliquots.filter((a) => a.supersededById === undefined || a.supersededById === null).at(-1);
}

function Step({ n, done, children }: { n: number; done: boolean; children: React.ReactNode }) {
  return (
    <span className="flex items-center gap-3">
      <span aria-hidden="true" className={`inline-flex size-9 shrink-0 items-center justify-center rounded-full border-2 text-lg font-bold ${done ? 'border-ok-700 bg-ok-50 text-ok-700' : 'border-slate-700 bg-card'}`}>
        {done ? '✓' : n}
      </span>
      <span>
        {children}
        <span className={`ml-3 rounded-full border-2 px-3 py-0.5 align-middle text-sm font-semibold ${done ? 'border-ok-700 bg-ok-50 text-ok-700' : 'border-line text-ink-soft'}`}>{done ? 'done' : 'to do'}</span>
      </span>
    </span>
  );
}

function AliquotRecord({ a, tz, current }: { a: Aliquot; tz?: string; current: boolean }) {
  return (
    <li
      data-testid={current ? 'aliquot-current' : 'aliquot-superseded'}
      className={`rounded-xl border-2 px-4 py-3 ${current ? 'border-ok-700 bg-ok-50' : 'border-line bg-slate-100/60'}`}
    >
      <div className={current ? '' : 'line-through decoration-2 opacity-75'}>
        <p className="text-sm font-semibold text-ink-soft">
          #{a.id} · {wareKindLabel(a.pipette.snapshot.kind)} <span className="num">{a.pipette.identifier}</span>
        </p>
        <p className="num text-3xl font-bold" data-testid={current ? 'aliquot-current-volume' : undefined}>
          {a.volumeMl} mL
        </p>
      </div>
      <p className="mt-1" data-testid={current ? 'aliquot-current-by' : undefined}>
        Recorded by {a.recordedBy.fullName}, {formatLabTime(a.recordedAt, tz)}
      </p>
      {a.pipette.snapshot.calibratedVolume ? (
        <p className="num mt-1" data-testid={current ? 'aliquot-current-calibrated' : undefined}>
          {calibratedVolumeLine(a.pipette.identifier, a.pipette.snapshot.calibratedVolume)}
        </p>
      ) : null}
      {a.correctionReason ? <p className="mt-1">Corrects #{a.supersedesId}: {a.correctionReason}</p> : null}
      {!current ? <p className="mt-1 text-sm font-semibold text-ink-soft">superseded by #{a.supersededById}</p> : null}
    </li>
  );
}

export function DilutionBench({ d, timeZone: tz }: { d: PreparationDetail; timeZone?: string }) {
  const dil = (d as PreparationDetail & LineageSection).dilution;
  const [correcting, setCorrecting] = useState(false);
  const [makeUpAgain, setMakeUpAgain] = useState(false);
  const [saved, setSaved] = useState<string | null>(null);
  if (!dil) return null;

  const planned = dil.plannedAliquot;
  const pipette = planned.pipette.snapshot;
  const fields = aliquotFieldsFor(pipette);
  const current = currentAliquot(dil.aliquots);
  const flask = d.snapshot.flask;
  const key = encodeURIComponent(d.identifier);
  // The server accepts aliquots (and their corrections) only while the record is planned.
  const aliquotOpen = d.status === 'planned';
  const result = dil.result;
  const parentConc = dil.parent.snapshot.concentration;

  return (
    <div className="flex flex-col gap-6" data-testid="dilution-bench">
      <MatrixWarningNote warning={dil.matrixWarning} />
      <section aria-label="What to pipette" className="grid gap-5 rounded-xl border-4 border-brass-400 bg-brass-100 px-5 py-5 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div className="min-w-0">
          <p className="text-lg font-bold">Pipette</p>
          <p className="flex flex-wrap items-baseline gap-x-3">
            <span data-testid="bench-aliquot-volume" className="num text-7xl font-bold tracking-tight">
              {planned.volumeMl}
            </span>
            <span className="text-3xl font-semibold">mL</span>
          </p>
          <p className="mt-2 text-xl">
            of{' '}
            <Link to={`/preparations/${encodeURIComponent(dil.parent.identifier)}`} className="num font-bold underline underline-offset-2" data-testid="bench-parent">
              {dil.parent.identifier}
            </Link>{' '}
            <span className="whitespace-nowrap">
              · <span className="num font-semibold" data-testid="bench-parent-concentration">{parentConc.display}</span>
            </span>
          </p>
          <p className="mt-1 text-xl">
            into <span className="num font-bold" data-testid="bench-flask">{flask ? flask.identifier : `${dil.plannedFinalMl} mL`}</span>
            {flask ? <span className="whitespace-nowrap"> ({flask.nominalVolumeMl} mL flask)</span> : null}, made up to the mark.
          </p>
        </div>
        <dl className="flex min-w-0 flex-col gap-3 text-lg">
          <div>
            <dt className="text-sm font-semibold text-ink-soft">Pipette to use</dt>
            <dd className="num text-4xl font-bold break-words" data-testid="bench-pipette">
              {planned.pipette.identifier}
            </dd>
            <dd className="text-base" data-testid="bench-pipette-kind">
              {wareKindLabel(pipette.kind)}, nominal <span className="num">{pipette.nominalVolumeMl} mL</span>
              {pipette.class && pipette.class !== 'n/a' ? `, class ${pipette.class}` : ''}
              {fields.volume === 'set' ? <> · set it to <span className="num font-semibold">{planned.volumeMl} mL</span></> : ' · delivers its nominal volume'}
            </dd>
          </div>
          <div>
            <dt className="text-sm font-semibold text-ink-soft">Expected concentration</dt>
            <dd className="num text-xl font-semibold" data-testid="bench-expected">
              {dil.planned.display}
            </dd>
          </div>
        </dl>
      </section>

      <HazardCautions hazards={d.hazards} testId="bench-cautions" showCodes={false} />

      {saved ? (
        <Banner tone="ok" title="Saved" testId="bench-saved">
          {saved}
        </Banner>
      ) : null}

      <div className="grid items-start gap-6 xl:grid-cols-2">
        <Panel title={<Step n={1} done={!!current}>Aliquot</Step>} id="bench-aliquot">
          <div className="flex flex-col gap-4">
            {current && !correcting ? (
              <ol className="flex flex-col gap-3" data-testid="aliquot-list">
                {[...dil.aliquots].reverse().map((a) => (
                  <AliquotRecord key={a.id} a={a} tz={tz} current={a.id === current.id} />
                ))}
              </ol>
            ) : null}
            {current && !correcting ? (
              aliquotOpen ? (
                <Button variant="secondary" data-testid="correct-aliquot" className="self-start" onClick={() => { setCorrecting(true); setSaved(null); }}>
                  Correct the aliquot (with a reason)
                </Button>
              ) : (
                <p className="text-ink-soft" data-testid="aliquot-closed">
                  The record is {d.status}: the aliquot can no longer be corrected here.
                </p>
              )
            ) : aliquotOpen ? (
              <AliquotForm
                key={correcting ? `correct-${current?.id}` : 'new'}
                detail={d}
                dilution={dil}
                correcting={correcting ? current : null}
                onCancel={() => setCorrecting(false)}
                onDone={(next) => {
                  const a = currentAliquot((next as PreparationDetail & LineageSection).dilution?.aliquots ?? []);
                  setCorrecting(false);
                  setSaved(`Aliquot #${a?.id ?? ''} stored: ${a?.volumeMl ?? ''} mL with ${a?.pipette.identifier ?? ''}.${next.makeUp ? '' : ' Now make up to volume.'}`);
                }}
              />
            ) : (
              <p className="text-ink-soft" data-testid="aliquot-closed">
                The record is {d.status}: no aliquot can be recorded.
              </p>
            )}
          </div>
        </Panel>

        <Panel title={<Step n={2} done={!!d.makeUp}>Make up to volume</Step>} id="bench-make-up">
          {d.makeUp ? (
            <p className="mb-4 rounded-lg border-2 border-ok-700 bg-ok-50 px-4 py-3" data-testid="make-up-done">
              Made up in <span className="num font-semibold">{d.makeUp.flask.identifier}</span> with {d.makeUp.solvent.name} (lot{' '}
              <span className="num">{d.makeUp.solvent.lot}</span>) at <span className="num">{d.makeUp.solutionTemperatureC} °C</span> by {d.makeUp.recordedBy.fullName},{' '}
              {formatLabTime(d.makeUp.recordedAt, tz)}.
            </p>
          ) : null}
          {d.makeUp && !makeUpAgain ? (
            <Button variant="secondary" data-testid="make-up-again" onClick={() => setMakeUpAgain(true)}>
              Make up again (with a reason)
            </Button>
          ) : current || d.makeUp ? (
            <MakeUpForm
              detail={d}
              onDone={(next) => {
                setMakeUpAgain(false);
                const r = (next as PreparationDetail & LineageSection).dilution?.result;
                setSaved(`Make-up stored.${r ? ` Concentration now ${r.display}.` : ''}`);
              }}
            />
          ) : (
            <p className="text-ink-soft" data-testid="make-up-wait">
              Record the aliquot first, then make up to the mark.
            </p>
          )}
        </Panel>
      </div>

      <Panel title={<Step n={3} done={d.status === 'prepared' || d.status === 'verified'}>Concentration and signature</Step>} id="bench-dilution-result">
        {result ? (
          <div className="flex flex-col gap-3">
            <p className="text-sm font-semibold text-ink-soft">Concentration from the recorded aliquot and make-up (expanded uncertainty, k = {result.k})</p>
            <p className="num text-4xl font-bold break-words" data-testid="bench-dilution-result">
              {result.display}
            </p>
            <p className="text-ink-soft">
              Relative standard uncertainty <span className="num">{percent(result.relative, 2)}</span> · from aliquot #{result.basedOn.aliquotId} and make-up #{result.basedOn.makeUpId} · planned{' '}
              <span className="num">{dil.planned.display}</span>
            </p>
            <NextStep d={d} keyPath={key} />
          </div>
        ) : (
          <p className="text-ink-soft" data-testid="bench-dilution-pending">
            The concentration ± U is recomputed here once the aliquot and the make-up are both recorded. Expected: <span className="num">{dil.planned.display}</span>.
          </p>
        )}
      </Panel>
    </div>
  );
}

const LINK = 'inline-flex min-h-14 items-center rounded-lg border-2 border-slate-700 px-6 text-lg font-semibold';

function NextStep({ d, keyPath }: { d: PreparationDetail; keyPath: string }) {
  const auth = useAuth();
  const chemist = auth.status === 'signed-in' && auth.user.role === 'chemist';
  if ((d.status === 'planned' || d.status === 'returned') && !chemist) {
    // technicians do the bench work; a chemist signs "prepared"
    return (
      <p data-testid="bench-next-step">
        Next: a chemist opens the record and signs it prepared.{' '}
        <Link to={`/preparations/${keyPath}`} className="font-semibold text-brass-600 underline">
          Open the record
        </Link>
      </p>
    );
  }
  if (d.status === 'planned' || d.status === 'returned') {
    return (
      <p>
        <Link to={`/preparations/${keyPath}`} data-testid="bench-next-step" className={`${LINK} bg-slate-700 text-white hover:bg-slate-900`}>
          Next: open the record to sign it prepared
        </Link>
      </p>
    );
  }
  if (d.status === 'prepared') {
    return (
      <p data-testid="bench-next-step">
        Signed as prepared: a second chemist (not the one who recorded the aliquot or make-up) verifies it.{' '}
        <Link to={`/preparations/${keyPath}`} className="font-semibold text-brass-600 underline">
          Open the record
        </Link>
      </p>
    );
  }
  if (d.status === 'verified') {
    return (
      <p>
        <Link to={`/preparations/${keyPath}/print`} data-testid="bench-next-step" className={`${LINK} bg-card hover:bg-slate-100`}>
          Verified: print its labels
        </Link>
      </p>
    );
  }
  return (
    <p data-testid="bench-next-step">
      The record is {d.status}.{' '}
      <Link to={`/preparations/${keyPath}`} className="font-semibold text-brass-600 underline">
        Open the record
      </Link>
    </p>
  );
}
