import { Link } from 'react-router';

export function NotFound() {
  return (
    <div data-testid="not-found" className="max-w-2xl rounded-xl border-2 border-line bg-card p-6">
      <p className="num text-5xl font-bold text-brass-600">404</p>
      <h1 className="mt-2 text-2xl font-bold">Page not found</h1>
      <p className="mt-2 text-ink-soft">There is no page at this address. It may have moved, or the link may be mistyped.</p>
      <Link to="/" className="mt-4 inline-flex min-h-12 items-center font-semibold text-brass-600 underline underline-offset-4">
        Back to home
      </Link>
    </div>
  );
}
