import { useEffect, useState } from 'react';
import { relabelReasonFromQuery } from '../../expiry/relabel.ts';
import { Button } from '../../../components/ui/button.tsx';
import { Banner } from '../../../components/ui/feedback.tsx';
import { useDebouncedValue } from '../../../hooks/use-debounced-value.ts';
import { ApiError } from '../../../lib/api-client.ts';
import type { LabelPrint, LabelPrintHistory, LabelTemplate } from '../../../../shared/schemas/printing.ts';
import type { PreparationDetail } from '../../preparations/types.ts';
import { printingUrls } from '../api/printing-keys.ts';
import { useRecordLabelPrint } from '../api/printing-mutations.ts';
import { pagesFor, templateContent, templateLayout, templateSize } from '../format.ts';
import { CopiesStepper, copiesError } from './copies-stepper.tsx';
import { PdfFrame } from './pdf-frame.tsx';

/** Statuses for which the server refuses label prints (409). */
const NO_PRINT_STATUSES = ['expired', 'discarded'];

function TemplatePicker({ templates, value, onChange }: { templates: LabelTemplate[]; value: number | null; onChange: (id: number) => void }) {
  return (
    <fieldset>
      <legend className="mb-2 text-sm font-semibold">Label template</legend>
      <div className="grid gap-3 md:grid-cols-2" data-testid="template-picker">
        {templates.map((t) => (
          <label
            key={t.id}
            htmlFor={`template-${t.id}`}
            data-testid="template-option"
            className="flex min-h-14 cursor-pointer items-start gap-3 rounded-lg border-2 border-line bg-card px-4 py-3 has-[:checked]:border-slate-700 has-[:checked]:bg-slate-100"
          >
            <input
              id={`template-${t.id}`}
              type="radio"
              name="templateId"
              value={t.id}
              checked={value === t.id}
              onChange={() => onChange(t.id)}
              className="mt-1 size-6 shrink-0 accent-slate-700"
            />
            <span>
              <span className="block font-semibold">{t.name}</span>
              <span className="num block text-sm">{templateSize(t)}</span>
              <span className="block text-sm text-ink-soft">
                {templateLayout(t)} · {templateContent(t.content)}
              </span>
            </span>
          </label>
        ))}
      </div>
    </fieldset>
  );
}

/**
 * Template, copies, live preview (not a print record) and "Print labels". Every print of a record's labels
 * after the first (any template, any version) is a reprint: it needs a reason and the user's confirmation that
 * the earlier labels are destroyed (REQUIREMENTS LB-07); the server refuses a reprint without a reason.
 */
export function LabelSection({
  detail,
  templates,
  history,
  canPrint,
}: {
  detail: PreparationDetail;
  templates: LabelTemplate[];
  history: LabelPrintHistory | undefined;
  canPrint: boolean;
}) {
  const active = templates.filter((t) => t.active);
  const [templateId, setTemplateId] = useState<number | null>(active[0]?.id ?? null);
  useEffect(() => {
    if (templateId === null && active[0]) setTemplateId(active[0].id);
  }, [templateId, active]);
  const [copies, setCopies] = useState(1);
  const [copiesText, setCopiesText] = useState('1');
  const [reason, setReason] = useState(() => relabelReasonFromQuery(typeof window === 'undefined' ? '' : window.location.search)); // pre-filled after an expiry extension
  const [destroyed, setDestroyed] = useState(false);
  const [errors, setErrors] = useState<{ reason?: string; destroyed?: string; copies?: string }>({});
  const [banner, setBanner] = useState<string | null>(null);
  const [lastPrint, setLastPrint] = useState<{ print: LabelPrint; pdfUrl: string; opened: boolean } | null>(null);
  /** the server said this is a reprint (e.g. someone else printed meanwhile) */
  const [serverSaysReprint, setServerSaysReprint] = useState<number | null>(null);
  const record = useRecordLabelPrint(detail.identifier);

  const template = active.find((t) => t.id === templateId) ?? null;
  const preview = useDebouncedValue(template ? { id: template.id, copies } : null, 500);
  // the record's first label print is the original; every later one, whatever the template, is a reprint
  const earlierPrints = history?.items.length ?? 0;
  const isReprint = !!template && (serverSaysReprint !== null || earlierPrints > 0);
  const blocked = NO_PRINT_STATUSES.includes(detail.status);
  const typedCopiesError = copiesError(copiesText);

  useEffect(() => {
    setErrors({});
    setBanner(null);
  }, [templateId]);

  if (active.length === 0) {
    return (
      <Banner tone="info" title="No label templates">
        An administrator sets up label templates under Admin → Label templates.
      </Banner>
    );
  }

  const onPrint = () => {
    setBanner(null);
    const next: typeof errors = {};
    if (typedCopiesError) next.copies = typedCopiesError;
    if (isReprint && reason.trim() === '') next.reason = 'Give the reason for the reprint';
    if (isReprint && !destroyed) next.destroyed = 'Confirm that the earlier labels are destroyed';
    setErrors(next);
    if (Object.keys(next).length > 0 || !template) return;
    // Opened now, inside the click, so the browser does not treat it as an unrequested pop-up.
    const win = window.open('about:blank', '_blank');
    record.mutate(
      { templateId: template.id, copies, ...(isReprint ? { reason: reason.trim() } : {}) },
      {
        onSuccess: (res) => {
          if (win) win.location.href = res.pdfUrl;
          setLastPrint({ ...res, opened: !!win });
          setReason('');
          setDestroyed(false);
        },
        onError: (error) => {
          win?.close();
          if (error instanceof ApiError && error.fields.reason) {
            setServerSaysReprint(template.id);
            setErrors({ reason: error.fields.reason });
            setBanner(error.message);
          } else if (error instanceof ApiError && error.fields.copies) {
            setErrors({ copies: error.fields.copies });
          } else {
            setBanner(error instanceof Error ? error.message : 'The labels were not printed.');
          }
        },
      },
    );
  };

  return (
    <div className="flex flex-col gap-5">
      <TemplatePicker templates={active} value={templateId} onChange={setTemplateId} />
      <div className="flex flex-wrap items-end gap-6">
        <CopiesStepper value={copies} onChange={setCopies} text={copiesText} onTextChange={setCopiesText} error={errors.copies ?? typedCopiesError} />
        {template && !typedCopiesError ? (
          <p className="pb-3 text-ink-soft" data-testid="label-pages">
            {copies} {copies === 1 ? 'label' : 'labels'} on {pagesFor(template, copies)} {pagesFor(template, copies) === 1 ? 'page' : 'pages'}
          </p>
        ) : null}
      </div>

      {preview ? (
        <div>
          <h3 className="mb-2 text-lg font-bold">Preview</h3>
          <p className="mb-2 text-sm text-ink-soft">Marked &ldquo;preview&rdquo;: a preview is not a print record. Print from the button below.</p>
          <PdfFrame src={printingUrls.labelsPreview(detail.identifier, preview.id, preview.copies)} title="Label preview" testId="labels-preview" height="24rem" />
        </div>
      ) : null}

      {canPrint ? (
        <div className="flex flex-col gap-4 rounded-lg border-2 border-line p-4" data-testid="print-controls">
          {isReprint ? (
            <div className="flex flex-col gap-3" data-testid="reprint-fields">
              <p className="font-semibold text-caution-700">
                Labels of this record were already printed{earlierPrints > 0 ? ` (${earlierPrints} ${earlierPrints === 1 ? 'time' : 'times'})` : ''}. This
                print is reprint No. {Math.max(earlierPrints, 1)}, whatever the template: the labels will say &ldquo;REPRINT&rdquo;.
              </p>
              <div>
                <label htmlFor="reprint-reason" className="mb-1 block text-sm font-semibold">
                  Reason for the reprint
                </label>
                <textarea
                  id="reprint-reason"
                  data-testid="reprint-reason"
                  rows={2}
                  maxLength={500}
                  value={reason}
                  onChange={(e) => setReason(e.target.value)}
                  aria-invalid={errors.reason ? true : undefined}
                  aria-describedby={errors.reason ? 'reprint-reason-error' : undefined}
                  className="field-input"
                  placeholder="e.g. label smudged by solvent"
                />
                {errors.reason ? (
                  <p id="reprint-reason-error" role="alert" className="mt-1 text-sm font-semibold text-bad-700">
                    {errors.reason}
                  </p>
                ) : null}
              </div>
              <label htmlFor="reprint-destroyed" className="flex min-h-12 cursor-pointer items-center gap-3 rounded-lg border-2 border-line bg-card px-3 py-2">
                <input
                  id="reprint-destroyed"
                  data-testid="reprint-destroyed"
                  type="checkbox"
                  checked={destroyed}
                  onChange={(e) => setDestroyed(e.target.checked)}
                  className="size-6 shrink-0 accent-slate-700"
                />
                <span className="font-semibold">The earlier labels are destroyed, or I will destroy them now</span>
              </label>
              {errors.destroyed ? (
                <p role="alert" className="text-sm font-semibold text-bad-700">
                  {errors.destroyed}
                </p>
              ) : null}
            </div>
          ) : null}
          {banner ? <Banner title="The labels were not printed">{banner}</Banner> : null}
          <div>
            <Button
              onClick={onPrint}
              busy={record.isPending}
              disabled={blocked || !template || !history || Boolean(typedCopiesError)}
              data-testid="print-labels"
              className="min-h-14 px-8 text-lg"
            >
              {typedCopiesError ? (isReprint ? 'Reprint labels' : 'Print labels') : isReprint ? `Reprint ${copies} ${copies === 1 ? 'label' : 'labels'}` : `Print ${copies} ${copies === 1 ? 'label' : 'labels'}`}
            </Button>
            {blocked ? <p className="mt-2 text-bad-700">Labels cannot be printed for a record that is {detail.status}.</p> : null}
          </div>
          {lastPrint ? (
            <Banner tone="ok" title={`Print ${lastPrint.print.number} recorded`} testId="last-print">
              {lastPrint.print.copies} {lastPrint.print.copies === 1 ? 'label' : 'labels'}
              {lastPrint.print.isReprint ? ' (reprint)' : ''}.{' '}
              {lastPrint.opened ? 'The labels opened in a new tab; print them from there. ' : ''}
              <a href={lastPrint.pdfUrl} target="_blank" rel="noopener" className="font-semibold underline" data-testid="last-print-pdf">
                Open the labels PDF
              </a>
            </Banner>
          ) : null}
        </div>
      ) : (
        <p className="text-ink-soft" data-testid="print-not-allowed">
          Labels are printed by chemists and technicians. You can view the preview and the print history.
        </p>
      )}
    </div>
  );
}
