import { stageLabel } from '../format.ts';
import type { Stage } from '../types.ts';

const TONES: Record<Stage, string> = {
  planned: 'border-slate-700 bg-slate-100 text-ink',
  weighed: 'border-brass-600 bg-brass-100 text-ink',
  made_up: 'border-brass-600 bg-brass-100 text-ink',
  complete: 'border-ok-700 bg-ok-50 text-ok-700',
};

/** One explanation for the two badges a record carries, shown as their tooltip and written on the bench badge. */
export const BADGES_EXPLAINED = 'Bench: how far the work is (planned, weighed, made up, complete). The badge with the two signature slots: who has signed (planned, prepared, verified).';

export function StageBadge({ stage, testId }: { stage: Stage | string; testId?: string }) {
  const tone = (TONES as Record<string, string>)[stage] ?? TONES.planned;
  return (
    <span className="inline-flex items-center gap-1 whitespace-nowrap" title={BADGES_EXPLAINED}>
      <span className="text-xs font-semibold uppercase tracking-wide text-ink-soft">Bench</span>
      <span data-testid={testId} className={`inline-flex items-center whitespace-nowrap rounded-full border-2 px-3 py-0.5 text-sm font-semibold ${tone}`}>
        {stageLabel(stage)}
      </span>
    </span>
  );
}
