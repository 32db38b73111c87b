/**
 * The bench view of a mix: nothing is weighed. One card per component, in order: what to pipette (volume huge,
 * pipette, parent and its concentration as used), then the aliquot form for that component (the dilution bench's
 * AliquotForm with the component's id; a correction supersedes with a reason, append-only). When every component
 * has its aliquot: make up to the mark (the ordinary make-up), then each analyte's recomputed concentration ± U.
 */
import { useState } from 'react';
import { Link } from 'react-router';
import { Button } from '../../../components/ui/button.tsx';
import { Banner, Panel } from '../../../components/ui/feedback.tsx';
import type { Aliquot, LineageSection, MixComponent } from '../../../../shared/schemas/lineage.ts';
import { MakeUpForm } from '../../preparations/components/make-up-form.tsx';
import { formatLabTime, percent } from '../../preparations/format.ts';
import type { PreparationDetail } from '../../preparations/types.ts';
import { aliquotFieldsFor, wareKindLabel } from '../../lineage/components/aliquot-fields.ts';
import { AliquotForm } from '../../lineage/components/aliquot-form.tsx';
import { currentComponentAliquot, mixOf } from './mix-panel.tsx';
import { HazardCautions } from '../../preparations/components/hazard-cautions.tsx';

function Done({ done }: { done: boolean }) {
  return (
    <span className={`ml-3 rounded-full border-2 px-3 py-0.5 align-middle text-sm font-semibold ${done ? 'border-ok-700 bg-ok-50 text-ok-700' : 'border-line text-ink-soft'}`}>{done ? 'done' : 'to do'}</span>
  );
}

function AliquotLine({ a, tz, current }: { a: Aliquot; tz?: string; current: boolean }) {
  return (
    <li data-testid={current ? 'mix-aliquot-current' : 'mix-aliquot-superseded'} className={`rounded-lg border-2 px-3 py-2 ${current ? 'border-ok-700 bg-ok-50' : 'border-line bg-slate-100/60'}`}>
      <span className={current ? 'num text-xl font-bold' : 'num line-through opacity-75'}>
        {a.volumeMl} mL with {a.pipette.identifier}
      </span>{' '}
      <span className="text-sm">
        #{a.id}, {a.recordedBy.fullName}, {formatLabTime(a.recordedAt, tz)}
        {a.correctionReason ? ` — corrects #${a.supersedesId}: ${a.correctionReason}` : ''}
        {!current ? ` (superseded by #${a.supersededById})` : ''}
      </span>
    </li>
  );
}

function ComponentCard({ d, c, n, open, active, correcting, tz, onOpen, onCorrect, onCancel, onSaved }: {
  d: PreparationDetail;
  c: MixComponent;
  n: number;
  open: boolean;
  active: boolean;
  correcting: boolean;
  tz?: string;
  onOpen: () => void;
  onCorrect: () => void;
  onCancel: () => void;
  onSaved: (next: PreparationDetail) => void;
}) {
  const planned = c.plannedAliquot;
  const pipette = planned.pipette.snapshot;
  const fields = aliquotFieldsFor(pipette);
  const current = currentComponentAliquot(c);
  return (
    <li className={`rounded-xl border-4 px-5 py-4 ${active ? 'border-brass-400 bg-brass-100' : 'border-line bg-card'}`} data-testid={`mix-bench-component-${c.analyteFormula}`}>
      <p className="text-lg font-bold">
        {n}. <span className="num">{c.analyteFormula}</span>
        <Done done={!!current} />
      </p>
      <p className="flex flex-wrap items-baseline gap-x-3">
        <span className="num text-6xl font-bold tracking-tight" data-testid={`mix-bench-volume-${c.analyteFormula}`}>
          {planned.volumeMl}
        </span>
        <span className="text-2xl font-semibold">mL</span>
        <span className="text-xl">
          of{' '}
          <Link to={`/preparations/${encodeURIComponent(c.parent.identifier)}`} className="num font-bold underline underline-offset-2">
            {c.parent.identifier}
          </Link>{' '}
          (<span className="num">{c.parent.snapshot.concentration.display}</span>)
        </span>
      </p>
      <p className="mt-1 text-lg">
        with <span className="num text-2xl font-bold">{planned.pipette.identifier}</span> — {wareKindLabel(pipette.kind)}, nominal <span className="num">{pipette.nominalVolumeMl} mL</span>
        {fields.volume === 'set' ? <> · set it to <span className="num font-semibold">{planned.volumeMl} mL</span></> : ' · delivers its nominal volume'}
      </p>
      <p className="mt-1 text-ink-soft">
        Expected <span className="num">{c.planned.display}</span>
      </p>
      {c.aliquots.length ? (
        <ol className="mt-3 flex flex-col gap-2">
          {[...c.aliquots].reverse().map((a) => (
            <AliquotLine key={a.id} a={a} tz={tz} current={a.id === current?.id} />
          ))}
        </ol>
      ) : null}
      <div className="mt-3">
        {d.status !== 'planned' ? (
          <p className="text-ink-soft">The record is {d.status}: aliquots can no longer be recorded or corrected here.</p>
        ) : open ? (
          <AliquotForm
            key={`${c.linkId}-${correcting ? `correct-${current?.id}` : 'new'}`}
            detail={d}
            dilution={c}
            componentId={c.linkId}
            correcting={correcting ? current : null}
            onCancel={onCancel}
            onDone={onSaved}
          />
        ) : current ? (
          <Button variant="secondary" onClick={onCorrect} data-testid={`mix-correct-${c.analyteFormula}`}>
            Correct this aliquot (with a reason)
          </Button>
        ) : (
          <Button variant="secondary" onClick={onOpen} data-testid={`mix-record-${c.analyteFormula}`}>
            Record this aliquot
          </Button>
        )}
      </div>
    </li>
  );
}

export function MixBench({ d, timeZone: tz }: { d: PreparationDetail; timeZone?: string }) {
  const mix = mixOf(d);
  const [chosen, setChosen] = useState<{ linkId: number; correcting: boolean } | null>(null);
  const [makeUpAgain, setMakeUpAgain] = useState(false);
  const [saved, setSaved] = useState<string | null>(null);
  if (!mix) return null;
  const firstOpen = mix.components.find((c) => !currentComponentAliquot(c));
  // the form shown: the one the user chose, else the first component still without an aliquot
  const openId = chosen?.linkId ?? firstOpen?.linkId;
  const allAliquots = !firstOpen;
  const done = mix.components.every((c) => c.result);
  const flask = d.snapshot.flask;

  return (
    <div className="flex flex-col gap-6" data-testid="mix-bench">
      <section aria-label="What to do" className="rounded-xl border-4 border-brass-400 bg-brass-100 px-5 py-4 text-xl">
        Pipette each standard below into{' '}
        <span className="num font-bold" data-testid="mix-bench-flask">
          {flask ? `${flask.identifier} (${flask.nominalVolumeMl} mL flask)` : `a ${mix.plannedFinalMl} mL flask`}
        </span>
        , then make up to the mark and mix well.
      </section>

      <HazardCautions hazards={d.hazards} testId="mix-bench-cautions" showCodes={false} />

      {saved ? (
        <Banner tone="ok" title="Saved" testId="bench-saved">
          {saved}
        </Banner>
      ) : null}

      <Panel title="Aliquots, one per standard" id="mix-bench-aliquots">
        <ol className="flex flex-col gap-4">
          {mix.components.map((c, i) => (
            <ComponentCard
              key={c.linkId}
              d={d}
              c={c}
              n={i + 1}
              tz={tz}
              open={openId === c.linkId && (chosen?.correcting || !currentComponentAliquot(c))}
              active={openId === c.linkId}
              correcting={chosen?.linkId === c.linkId && chosen.correcting}
              onOpen={() => setChosen({ linkId: c.linkId, correcting: false })}
              onCorrect={() => {
                setChosen({ linkId: c.linkId, correcting: true });
                setSaved(null);
              }}
              onCancel={() => setChosen(null)}
              onSaved={(next) => {
                const nc = (next as PreparationDetail & LineageSection).mix?.components.find((x) => x.linkId === c.linkId);
                const a = nc ? currentComponentAliquot(nc) : undefined;
                setChosen(null);
                setSaved(`${c.analyteFormula}: aliquot #${a?.id ?? ''} stored, ${a?.volumeMl ?? ''} mL with ${a?.pipette.identifier ?? ''}.`);
              }}
            />
          ))}
        </ol>
      </Panel>

      <Panel title={<span>Make up to volume <Done done={!!d.makeUp} /></span>} id="bench-make-up">
        {d.makeUp ? (
          <p className="mb-4 rounded-lg border-2 border-ok-700 bg-ok-50 px-4 py-3" data-testid="make-up-done">
            Made up in <span className="num font-semibold">{d.makeUp.flask.identifier}</span> with {d.makeUp.solvent.name} (lot <span className="num">{d.makeUp.solvent.lot}</span>) at{' '}
            <span className="num">{d.makeUp.solutionTemperatureC} °C</span> by {d.makeUp.recordedBy.fullName}, {formatLabTime(d.makeUp.recordedAt, tz)}.
          </p>
        ) : null}
        {d.makeUp && !makeUpAgain ? (
          <Button variant="secondary" data-testid="make-up-again" onClick={() => setMakeUpAgain(true)}>
            Make up again (with a reason)
          </Button>
        ) : allAliquots || d.makeUp ? (
          <MakeUpForm
            detail={d}
            onDone={(next) => {
              setMakeUpAgain(false);
              setSaved(`Make-up stored.${next.concentrationDisplay ? ` Concentrations now ${next.concentrationDisplay}.` : ''}`);
            }}
          />
        ) : (
          <p className="text-ink-soft" data-testid="make-up-wait">
            Record the aliquot of every standard first, then make up to the mark.
          </p>
        )}
      </Panel>

      <Panel title={<span>Concentrations <Done done={done} /></span>} id="mix-bench-results">
        {done ? (
          <ul className="flex flex-col gap-3" data-testid="mix-bench-results-list">
            {mix.components.map((c) => (
              <li key={c.linkId}>
                <span className="num text-lg font-bold">{c.analyteFormula}</span>{' '}
                <span className="num text-3xl font-bold" data-testid={`mix-bench-result-${c.analyteFormula}`}>
                  {c.result!.display}
                </span>{' '}
                <span className="text-ink-soft">
                  u<sub>r</sub> <span className="num">{percent(c.result!.relative, 2)}</span> · planned <span className="num">{c.planned.display}</span>
                </span>
              </li>
            ))}
          </ul>
        ) : (
          <p className="text-ink-soft">Each analyte&apos;s concentration ± U is recomputed here once every aliquot and the make-up are recorded.</p>
        )}
        {done && (d.status === 'planned' || d.status === 'returned') ? (
          <p className="mt-4">
            <Link to={`/preparations/${encodeURIComponent(d.identifier)}`} data-testid="bench-next-step" className="inline-flex min-h-14 items-center rounded-lg border-2 border-slate-700 bg-slate-700 px-6 text-lg font-semibold text-white hover:bg-slate-900">
              Next: open the record to sign it prepared
            </Link>
          </p>
        ) : null}
      </Panel>
    </div>
  );
}
