import { sig } from '../../calculate/format-result.ts';
import { Button } from '../../../components/ui/button.tsx';
import { formatLabTime, qty } from '../format.ts';
import type { Weighing } from '../types.ts';

function readings(w: Weighing) {
  if (w.mode === 'direct') return <span className="num text-2xl font-bold">{qty(w.reading)}</span>;
  return (
    <span className="num text-lg font-semibold">
      before {qty(w.before)} · after {qty(w.after)}
    </span>
  );
}

/**
 * Every weighing as recorded, oldest first; superseded entries stay visible, struck through
 * (REQUIREMENTS OT-02: no attempt is overwritten or deleted).
 */
export function WeighingList({ weighings, timeZone, onCorrect }: { weighings: Weighing[]; timeZone?: string; onCorrect?: (w: Weighing) => void }) {
  if (weighings.length === 0) return <p className="text-ink-soft" data-testid="no-weighings">No weighing recorded yet.</p>;
  return (
    <ol className="flex flex-col gap-3" data-testid="weighing-list">
      {weighings.map((w) => {
        const superseded = w.supersededById !== undefined && w.supersededById !== null;
        return (
          <li
            key={w.id}
            data-testid="weighing-entry"
            data-superseded={superseded || undefined}
            className={`rounded-xl border-2 px-4 py-3 ${superseded ? 'border-line bg-slate-100/60' : w.inWindow ? 'border-ok-700 bg-card' : 'border-caution-700 bg-caution-50'}`}
          >
            <div className="flex flex-wrap items-start justify-between gap-3">
              <div className={superseded ? 'line-through decoration-2 opacity-75' : ''}>
                <p className="text-sm font-semibold text-ink-soft">
                  #{w.id} · {w.mode === 'direct' ? 'Direct, tared vessel' : 'By difference'} · {w.balance.identifier}
                </p>
                <p className="mt-1" data-testid="weighing-raw">
                  {readings(w)}
                </p>
                <p className="num mt-1">net {qty(w.net)}</p>
              </div>
              <div className="flex flex-col items-end gap-2">
                {superseded ? (
                  <span data-testid="weighing-superseded" className="rounded-full border-2 border-ink-soft px-3 py-0.5 text-sm font-semibold text-ink-soft">
                    superseded by #{w.supersededById}
                  </span>
                ) : w.inWindow ? (
                  <span className="rounded-full border-2 border-ok-700 bg-ok-50 px-3 py-0.5 text-sm font-semibold text-ok-700">in window</span>
                ) : (
                  <span className="rounded-full border-2 border-caution-700 bg-caution-50 px-3 py-0.5 text-sm font-semibold text-caution-700">outside window</span>
                )}
                {onCorrect && !superseded ? (
                  <Button variant="secondary" data-testid={`correct-weighing-${w.id}`} onClick={() => onCorrect(w)}>
                    Correct
                  </Button>
                ) : null}
              </div>
            </div>
            <dl className="mt-2 grid gap-x-6 gap-y-1 text-sm sm:grid-cols-2">
              <div>
                <dt className="inline font-semibold">Conditions: </dt>
                <dd className="inline num">
                  {w.conditions.temperatureC} °C, {w.conditions.pressureHPa} hPa, {w.conditions.relativeHumidityPct} % RH
                  {w.conditions.source === 'lab-default' ? ' (lab defaults)' : ''}
                </dd>
              </div>
              <div>
                <dt className="inline font-semibold">Air density: </dt>
                <dd className="inline num">{sig(w.airDensity, 5)} g/mL</dd>
              </div>
              <div>
                <dt className="inline font-semibold">Recorded: </dt>
                <dd className="inline">
                  {w.recordedBy.fullName}, {formatLabTime(w.recordedAt, timeZone)}
                </dd>
              </div>
              {w.outOfWindowReason ? (
                <div>
                  <dt className="inline font-semibold">Outside the window because: </dt>
                  <dd className="inline">{w.outOfWindowReason}</dd>
                </div>
              ) : null}
              {w.supersedesId ? (
                <div className="sm:col-span-2">
                  <dt className="inline font-semibold">Corrects #{w.supersedesId}: </dt>
                  <dd className="inline">{w.correctionReason}</dd>
                </div>
              ) : null}
            </dl>
          </li>
        );
      })}
    </ol>
  );
}
