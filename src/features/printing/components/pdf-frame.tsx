/**
 * A server-rendered PDF shown in an <iframe> (the CSP allows same-origin frames; <object> is blocked by
 * object-src 'none'), with an "Open / download" link for browsers and tablets that do not show PDFs inline.
 */
export function PdfFrame({ src, title, testId, height = '36rem' }: { src: string; title: string; testId: string; height?: string }) {
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
          href={src}
          target="_blank"
          rel="noopener"
          data-testid={`${testId}-open`}
          className="inline-flex min-h-12 items-center rounded-lg border-2 border-slate-700 bg-card px-5 font-semibold hover:bg-slate-100"
        >
          Open / download
        </a>
      </div>
    </div>
  );
}
