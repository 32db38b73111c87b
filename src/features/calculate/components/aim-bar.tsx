import type { LiveResult } from '../live-calculation.ts';
import { fixed } from '../format-result.ts';
import { readingDecimals } from './results-panel.tsx';

/**
 * On screens without room for a side-by-side summary (tablets at the bench), the reading to aim
 * for and the concentration stay pinned to the bottom edge while the form scrolls.
 */
export function AimBar({ live, readingTyped }: { live: LiveResult; readingTyped: string }) {
  return (
    <div
      data-testid="aim-bar"
      className="fixed inset-x-0 bottom-0 z-20 border-t-4 border-brass-400 bg-slate-900 px-4 py-2 text-white xl:hidden"
    >
      <div className="mx-auto flex max-w-5xl flex-wrap items-baseline justify-between gap-x-6 gap-y-1">
        {live.status === 'ok' ? (
          <>
            <p className="flex items-baseline gap-2">
              <span className="text-sm font-semibold text-slate-100">Aim for</span>
              <span className="num text-3xl font-bold">
                {fixed(live.result.balanceReading.value, readingDecimals(live.result.balanceReading.unit, readingTyped))}
              </span>
              <span className="text-lg">{live.result.balanceReading.unit}</span>
            </p>
            {live.result.actual ? (
              <p className="num text-xl font-semibold">{live.result.actual.concentration.display}</p>
            ) : (
              <p className="text-sm text-slate-100">Enter the reading for the concentration</p>
            )}
          </>
        ) : (
          <p className="font-semibold text-brass-400">No result: fix the highlighted inputs</p>
        )}
      </div>
    </div>
  );
}
