import type { BudgetRowView } from '../result-types.ts';
import { shareParts, sig } from '../format-result.ts';

export function BudgetTable({ rows, outputUnit }: { rows: BudgetRowView[]; outputUnit: string }) {
  return (
    <div className="overflow-x-auto">
      <table data-testid="budget-table" className="w-full min-w-[36rem] border-collapse text-left text-[0.95rem]">
        <caption className="mb-2 text-left text-sm text-ink-soft">
          First-order GUM propagation. Contribution = |sensitivity × standard uncertainty|, in {outputUnit}; share is
          the fraction of the combined variance.
        </caption>
        <thead className="bg-slate-100 text-sm">
          <tr>
            <th scope="col" className="px-3 py-2">Input</th>
            <th scope="col" className="px-3 py-2 text-right">Standard uncertainty</th>
            <th scope="col" className="px-3 py-2 text-right">Sensitivity</th>
            <th scope="col" className="px-3 py-2 text-right">Contribution</th>
            <th scope="col" className="px-3 py-2">Share</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((r) => {
            const share = shareParts(r.share);
            return (
              <tr key={r.input} className="border-t border-line" data-testid={`budget-row-${r.input}`}>
                <th scope="row" className="px-3 py-2 font-semibold">
                  {r.label ?? r.input}
                </th>
                <td className="num px-3 py-2 text-right whitespace-nowrap">
                  {sig(r.standardUncertainty, 3)}
                  {r.unit && r.unit !== '1' ? <span className="ml-1 font-sans text-sm text-ink-soft">{r.unit}</span> : null}
                </td>
                <td className="num px-3 py-2 text-right whitespace-nowrap">{sig(r.sensitivity, 4)}</td>
                <td className="num px-3 py-2 text-right whitespace-nowrap">{sig(r.contribution, 3)}</td>
                <td className="px-3 py-2">
                  <div className="flex items-center gap-2">
                    <div className="h-4 w-28 shrink-0 overflow-hidden rounded bg-slate-100" aria-hidden="true">
                      <div className="h-full rounded bg-brass-600" style={{ width: share.width }} />
                    </div>
                    <span className="num w-16 text-right text-sm">{share.label}</span>
                  </div>
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}
