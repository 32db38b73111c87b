import { useQuery } from '@tanstack/react-query';
import { Link, useParams } from 'react-router';
import { Banner, PageHeader, Panel, Spinner } from '../../components/ui/feedback.tsx';
import { UNVERIFIED_MARK } from '../../../shared/schemas/printing.ts';
import { useAuth } from '../auth/use-auth.ts';
import { settingsQueries } from '../calculate/api/settings-queries.ts';
import { preparationQueries } from '../preparations/api/preparation-queries.ts';
import { statusLabel } from '../preparations/format.ts';
import { printingUrls } from './api/printing-keys.ts';
import { printingQueries } from './api/printing-queries.ts';
import { LabelSection } from './components/label-section.tsx';
import { PdfFrame } from './components/pdf-frame.tsx';
import { PrintHistory } from './components/print-history.tsx';

/**
 * /preparations/:identifier/print: the prep sheet and the vial labels of one record. Every PDF is rendered
 * by the server; this page only shows it in a frame and records label prints (chemist, technician).
 * QA sees the prep sheet, the preview and the history, without the print controls.
 */
export function PrintPage() {
  const { identifier = '' } = useParams();
  const auth = useAuth();
  const detail = useQuery(preparationQueries.detail(identifier));
  const templates = useQuery(printingQueries.templates());
  const history = useQuery(printingQueries.history(identifier));
  const settings = useQuery(settingsQueries.detail());

  if (detail.isPending) return <Spinner label="Loading the preparation…" />;
  if (detail.isError) {
    return (
      <Banner title={detail.error.status === 404 ? `No preparation ${identifier}` : 'The preparation could not be loaded'}>
        {detail.error.message}{' '}
        <Link to="/preparations" className="font-semibold underline">
          Back to the list
        </Link>
      </Banner>
    );
  }
  const d = detail.data;
  const role = auth.status === 'signed-in' ? auth.user.role : null;
  const canPrint = role === 'chemist' || role === 'technician';
  const tz = settings.data?.timeZone;

  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title={
          <span className="flex flex-wrap items-center gap-3">
            Print <span className="num" data-testid="print-identifier">{d.identifier}</span>
            <span className="rounded-full border-2 border-slate-700 px-3 py-0.5 text-sm font-semibold" data-testid="print-status">
              {statusLabel(d.status)}
            </span>
          </span>
        }
      >
        <p>
          {d.materialName} as <span className="num">{d.analyteFormula}</span> · version {d.version} ·{' '}
          <Link to={`/preparations/${encodeURIComponent(d.identifier)}`} className="font-semibold text-ink underline" data-testid="back-to-record">
            Back to the record
          </Link>
        </p>
      </PageHeader>

      {d.status !== 'verified' ? (
        <div role="status" data-testid="unverified-warning" className="rounded-lg border-2 border-l-8 border-bad-700 bg-bad-50 px-4 py-3 text-bad-700">
          <p className="font-bold">This record is not verified ({statusLabel(d.status)}).</p>
          <p className="text-ink">
            The prep sheet and every label printed now carry the mark <strong className="text-bad-700">&ldquo;{UNVERIFIED_MARK}&rdquo;</strong>. Print
            again after verification for labels without it.
          </p>
        </div>
      ) : null}

      <Panel title="Prep sheet" id="print-sheet">
        <p className="mb-3 text-ink-soft">The complete record as a PDF: plan, weighings, make-up, result, signatures and hazards.</p>
        {/* the frame shows a preview (not recorded); the print link fetches the sheet that is recorded as printed */}
        <PdfFrame
          src={printingUrls.prepSheetPreview(d.identifier)}
          title={`Prep sheet ${d.identifier}`}
          testId="prep-sheet"
          open={{ href: printingUrls.prepSheet(d.identifier), label: 'Print the prep sheet', note: 'Opens the sheet to print in a new tab; each one is recorded as a print. The preview above is not.' }}
        />
      </Panel>

      <Panel title="Labels" id="print-labels">
        {templates.isPending ? (
          <Spinner label="Loading the label templates…" />
        ) : templates.isError ? (
          <Banner title="The label templates could not be loaded">{templates.error.message}</Banner>
        ) : (
          <LabelSection detail={d} templates={templates.data.items} history={history.data} canPrint={canPrint} />
        )}
      </Panel>

      <Panel title="Print history" id="print-history">
        {history.isPending ? (
          <Spinner label="Loading the print history…" />
        ) : history.isError ? (
          <Banner title="The print history could not be loaded">{history.error.message}</Banner>
        ) : (
          <PrintHistory history={history.data} timeZone={tz} />
        )}
      </Panel>
    </div>
  );
}
