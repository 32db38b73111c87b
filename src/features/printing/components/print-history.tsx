import type { LabelPrintHistory } from '../../../../shared/schemas/printing.ts';
import { formatLabTime } from '../../preparations/format.ts';
import { printingUrls } from '../api/printing-keys.ts';

/** Every label print of the record, newest first: number, original/reprint, copies, template, who, when (lab time zone). */
export function PrintHistory({ history, timeZone }: { history: LabelPrintHistory; timeZone?: string }) {
  if (history.items.length === 0) {
    return (
      <p className="text-ink-soft" data-testid="print-history-empty">
        No labels have been printed for this record yet.
      </p>
    );
  }
  const { counts } = history;
  return (
    <div className="flex flex-col gap-3">
      <p data-testid="print-counts">
        {counts.originals} original {counts.originals === 1 ? 'print' : 'prints'}, {counts.reprints} {counts.reprints === 1 ? 'reprint' : 'reprints'},{' '}
        {counts.labels} {counts.labels === 1 ? 'label' : 'labels'} in total.
      </p>
      <div className="overflow-x-auto">
        <table className="w-full min-w-[48rem] border-collapse text-left" data-testid="print-history">
          <thead>
            <tr className="border-b-2 border-line text-sm text-ink-soft">
              <th scope="col" className="py-2 pr-4">No.</th>
              <th scope="col" className="py-2 pr-4">Kind</th>
              <th scope="col" className="py-2 pr-4">Copies</th>
              <th scope="col" className="py-2 pr-4">Template</th>
              <th scope="col" className="py-2 pr-4">Record version</th>
              <th scope="col" className="py-2 pr-4">Printed by</th>
              <th scope="col" className="py-2 pr-4">When</th>
              <th scope="col" className="py-2 pr-4">Reason</th>
              <th scope="col" className="py-2">PDF</th>
            </tr>
          </thead>
          <tbody>
            {history.items.map((p) => (
              <tr key={p.id} className="border-b border-line align-top" data-testid="print-row" data-reprint={p.isReprint ? 'true' : 'false'}>
                <td className="num py-3 pr-4">{p.number}</td>
                <td className="py-3 pr-4" data-testid="print-kind">
                  {p.isReprint ? (
                    <span className="rounded-full border-2 border-caution-700 bg-caution-50 px-2 py-0.5 text-sm font-semibold text-caution-700">
                      Reprint {p.number - 1}
                    </span>
                  ) : (
                    <span className="rounded-full border-2 border-slate-700 px-2 py-0.5 text-sm font-semibold">Original</span>
                  )}
                  {p.statusAtPrint !== 'verified' ? <span className="mt-1 block text-sm text-bad-700">unverified mark</span> : null}
                </td>
                <td className="num py-3 pr-4">{p.copies}</td>
                <td className="py-3 pr-4">{p.templateName}</td>
                <td className="num py-3 pr-4">v{p.preparationVersion}</td>
                <td className="py-3 pr-4">{p.printedBy.fullName}</td>
                <td className="py-3 pr-4">{formatLabTime(p.printedAt, timeZone)}</td>
                <td className="py-3 pr-4">{p.reason ?? '—'}</td>
                <td className="py-3">
                  <a
                    href={printingUrls.printLabels(p.id)}
                    target="_blank"
                    rel="noopener"
                    className="inline-flex min-h-12 items-center font-semibold underline"
                    aria-label={`Labels PDF of print ${p.number}`}
                  >
                    PDF
                  </a>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
