/**
 * A server-rendered PDF shown in an <iframe> (the CSP allows same-origin frames; <object> is blocked by
 * object-src 'none'), with an "Open / download" link for browsers and tablets that do not show PDFs inline.
 */
export function PdfFrame({
  src,
  title,
  testId,
  height = '36rem',
  open,
}: {
  src: string;
  title: string;
  testId: string;
  height?: string;
  /** the link under the frame (default: open the framed PDF itself) */
  open?: { href: string; label: string; note?: string };
}) {
  return (
    <div className="flex flex-col gap-3">
      <iframe
        key={src}
        src={src}
        title={title}
        data-testid={testId}
        className="w-full rounded-lg border-2 border-line bg-slate-100"
        style={{ height }}
      />
      <div className="flex flex-wrap gap-3">
        <a
          href={open?.href ?? src}
          target="_blank"
          rel="noopener"
          data-testid={`${testId}-open`}
          className="inline-flex min-h-12 items-center rounded-lg border-2 border-slate-700 bg-card px-5 font-semibold hover:bg-slate-100"
        >
          {open?.label ?? 'Open / download'}
        </a>
        {open?.note ? <p className="self-center text-sm text-ink-soft">{open.note}</p> : null}
      </div>
    </div>
  );
}
