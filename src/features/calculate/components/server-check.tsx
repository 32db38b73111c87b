import { useMutation } from '@tanstack/react-query';
import { api, type ApiError } from '../../../lib/api-client.ts';
import { Button } from '../../../components/ui/button.tsx';
import type { FormRequest } from '../calc-form-schema.ts';
import type { PreparationView } from '../result-types.ts';
import { sameNumber, sig } from '../format-result.ts';

type Row = { key: string; label: string; browser?: string; server?: string; text?: boolean };

function rowsFor(b: PreparationView, s: PreparationView): Row[] {
  const rows: Row[] = [
    { key: 'airDensity', label: 'Air density', browser: b.airDensity?.value, server: s.airDensity?.value },
    { key: 'gravimetricFactor', label: 'Gravimetric factor', browser: b.gravimetricFactor, server: s.gravimetricFactor },
    { key: 'buoyancyFactor', label: 'Buoyancy factor', browser: b.buoyancyFactor, server: s.buoyancyFactor },
    { key: 'trueMass', label: 'True mass needed', browser: b.trueMass?.value, server: s.trueMass?.value },
    { key: 'balanceReading', label: 'Reading to aim for', browser: b.balanceReading?.value, server: s.balanceReading?.value },
  ];
  if (b.actual || s.actual) {
    rows.push(
      { key: 'actualTrueMass', label: 'True mass weighed', browser: b.actual?.trueMass.value, server: s.actual?.trueMass.value },
      { key: 'concentration', label: 'Concentration', browser: b.actual?.concentration.value, server: s.actual?.concentration.value },
      {
        key: 'expandedUncertainty',
        label: 'Expanded uncertainty',
        browser: b.actual?.concentration.expandedUncertainty,
        server: s.actual?.concentration.expandedUncertainty,
      },
      { key: 'display', label: 'Result as reported', browser: b.actual?.concentration.display, server: s.actual?.concentration.display, text: true },
    );
  }
  return rows;
}

function matches(r: Row) {
  return r.text ? r.browser === r.server : sameNumber(r.browser, r.server);
}

export type ServerCheckState = { requestKey: string; result: PreparationView };

/**
 * Sends the same request to POST /api/calc/preparation and puts the server's numbers beside the
 * browser's. Both run the same shared core, so any difference is a bug worth reporting.
 */
export function ServerCheck({ request, browser }: { request: FormRequest | null; browser: PreparationView | null }) {
  const requestKey = request ? JSON.stringify(request) : '';
  const check = useMutation<ServerCheckState, ApiError, FormRequest>({
    mutationFn: async (req) => ({ requestKey: JSON.stringify(req), result: await api.post<PreparationView>('/api/calc/preparation', req) }),
  });

  const stale = check.data ? check.data.requestKey !== requestKey : false;
  const rows = check.data && browser && !stale ? rowsFor(browser, check.data.result) : [];
  const allMatch = rows.length > 0 && rows.every(matches);
  const status = check.isPending
    ? 'pending'
    : check.isError
      ? 'error'
      : !check.data
        ? 'idle'
        : stale
          ? 'stale'
          : allMatch
            ? 'match'
            : 'mismatch';

  return (
    <section aria-labelledby="server-check-title" data-testid="server-check" data-status={status} className="flex flex-col gap-3">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h3 id="server-check-title" className="text-lg font-bold">
          Check on server
        </h3>
        <Button
          variant="secondary"
          data-testid="server-check-button"
          disabled={!request}
          busy={check.isPending}
          onClick={() => request && check.mutate(request)}
        >
          Check on server
        </Button>
      </div>
      <p className="text-sm text-ink-soft">
        Sends these inputs to the Tarebook server, which recomputes everything with the same core. The numbers should
        agree to the last digit.
      </p>

      <div aria-live="polite">
        {status === 'error' && check.error ? (
          <p role="alert" className="rounded-lg border-2 border-bad-700 bg-bad-50 px-4 py-3 font-semibold text-bad-700">
            The server refused the request: {check.error.message}
            {Object.keys(check.error.fields).length > 0 ? (
              <span className="mt-1 block font-normal">
                {Object.entries(check.error.fields).map(([k, v]) => (
                  <span key={k} className="block">
                    {k}: {v}
                  </span>
                ))}
              </span>
            ) : null}
          </p>
        ) : null}
        {status === 'stale' ? (
          <p className="rounded-lg border-2 border-line bg-slate-100 px-4 py-3">The inputs changed since the last check. Check again.</p>
        ) : null}
        {status === 'match' ? (
          <p data-testid="server-check-result" className="rounded-lg border-2 border-ok-700 bg-ok-50 px-4 py-3 font-semibold text-ok-700">
            ✓ Server and browser agree on every number.
          </p>
        ) : null}
        {status === 'mismatch' ? (
          <p data-testid="server-check-result" className="rounded-lg border-2 border-bad-700 bg-bad-50 px-4 py-3 font-semibold text-bad-700">
            ✗ Server and browser disagree. Do not use these numbers; report this to your administrator.
          </p>
        ) : null}
      </div>

      {rows.length > 0 ? (
        <div className="overflow-x-auto">
          <table className="w-full min-w-[30rem] border-collapse text-left text-[0.95rem]">
            <thead className="bg-slate-100 text-sm">
              <tr>
                <th scope="col" className="px-3 py-2">Quantity</th>
                <th scope="col" className="px-3 py-2 text-right">Browser</th>
                <th scope="col" className="px-3 py-2 text-right">Server</th>
                <th scope="col" className="px-3 py-2">
                  <span className="sr-only">Agreement</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {rows.map((r) => {
                const ok = matches(r);
                return (
                  <tr key={r.key} className="border-t border-line" data-testid={`server-row-${r.key}`} data-match={ok}>
                    <th scope="row" className="px-3 py-2 font-semibold">
                      {r.label}
                    </th>
                    <td className="num px-3 py-2 text-right">{r.text ? (r.browser ?? '—') : sig(r.browser, 10)}</td>
                    <td className="num px-3 py-2 text-right">{r.text ? (r.server ?? '—') : sig(r.server, 10)}</td>
                    <td className={`px-3 py-2 font-bold ${ok ? 'text-ok-700' : 'text-bad-700'}`}>{ok ? '✓ same' : '✗ differs'}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
          <p className="mt-1 text-sm text-ink-soft">Compared at full precision; shown here to 10 significant figures.</p>
        </div>
      ) : null}
    </section>
  );
}
