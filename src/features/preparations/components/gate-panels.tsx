import type { GateView } from '../types.ts';

/** Each planning gate with why it fired and what to do: blocks red, warnings amber (shared/prep/gates.ts). */
/** Also shows other records' gates (a volume check's balance gates): any code, the same severity, message and action. */
export function GatePanels({ gates }: { gates: Array<Pick<GateView, 'severity' | 'message' | 'action'> & { code: string }> }) {
  if (gates.length === 0) return null;
  const ordered = [...gates.filter((g) => g.severity === 'block'), ...gates.filter((g) => g.severity !== 'block')];
  return (
    <div className="flex flex-col gap-3" data-testid="gates">
      {ordered.map((g, i) => {
        const block = g.severity === 'block';
        return (
          <div
            key={`${g.code}-${i}`}
            role={block ? 'alert' : 'status'}
            data-testid={block ? 'gate-block' : 'gate-warn'}
            data-code={g.code}
            className={`rounded-lg border-2 border-l-8 px-4 py-3 ${
              block ? 'border-bad-700 bg-bad-50 text-bad-700' : 'border-caution-700 bg-caution-50 text-caution-700'
            }`}
          >
            <p className="font-bold">{block ? 'Cannot be planned like this' : 'Check before you weigh'}</p>
            <p className="mt-1 text-ink">{g.message}.</p>
            <p className="mt-1 text-ink">
              <span className="font-semibold">What to do: </span>
              {g.action}.
            </p>
          </div>
        );
      })}
    </div>
  );
}
