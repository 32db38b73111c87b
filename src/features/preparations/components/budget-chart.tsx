import { Bar, BarChart, CartesianGrid, LabelList, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { D } from '../../../../shared/calc/decimal.ts';
import type { BudgetEntry } from '../types.ts';

/** Share of the combined variance, in percent with one decimal, for the chart only (display edge). */
function sharePct(s: string): number {
  try {
    const x = new D(s);
    const pct = x.gt(1) ? x : x.mul(100);
    return Number(pct.toDecimalPlaces(1).toFixed(1));
  } catch {
    return 0;
  }
}

/** One line per bar: long budget labels ("Solution temperature (not corrected; …)") are cut at a word. */
function shortLabel(s: string, max = 30): string {
  const first = s.split(/[(;:]/)[0]!.trim();
  const base = first.length >= 4 ? first : s;
  if (base.length <= max) return base;
  const cut = base.slice(0, max - 1);
  return `${cut.slice(0, Math.max(cut.lastIndexOf(' '), max - 8)).trimEnd()}…`;
}

/** Horizontal bars: which input dominates the uncertainty of the concentration (GUM variance shares). */
export function BudgetChart({ rows }: { rows: BudgetEntry[] }) {
  const data = rows
    .map((r) => ({ label: shortLabel(r.label || r.input), full: r.label || r.input, share: sharePct(r.share) }))
    .sort((a, b) => b.share - a.share);
  const height = Math.max(160, data.length * 34 + 48);
  return (
    <figure data-testid="budget-chart" className="m-0">
      <figcaption className="mb-2 text-sm text-ink-soft">Share of the combined variance, per input (%).</figcaption>
      <div style={{ width: '100%', height }}>
        <ResponsiveContainer width="100%" height="100%">
          <BarChart data={data} layout="vertical" margin={{ top: 4, right: 56, bottom: 4, left: 8 }}>
            <CartesianGrid horizontal={false} stroke="#c9c1ae" strokeDasharray="3 3" />
            <XAxis type="number" domain={[0, 100]} unit=" %" tick={{ fill: '#46525e', fontSize: 13 }} />
            <YAxis type="category" dataKey="label" width={230} tick={{ fill: '#17212b', fontSize: 14, width: 400 }} interval={0} />
            <Tooltip
              formatter={(v) => [`${String(v)} %`, 'Share']}
              labelFormatter={(_l, payload) => String((payload?.[0]?.payload as { full?: string } | undefined)?.full ?? _l)}
              cursor={{ fill: '#e3e8ec' }}
            />
            <Bar dataKey="share" fill="#8a5a06" isAnimationActive={false} radius={[0, 4, 4, 0]}>
              <LabelList dataKey="share" position="right" formatter={(v: unknown) => `${String(v)} %`} style={{ fill: '#17212b', fontSize: 13 }} />
            </Bar>
          </BarChart>
        </ResponsiveContainer>
      </div>
    </figure>
  );
}
