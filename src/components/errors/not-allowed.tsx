import { Link } from 'react-router';
import { roleLabel } from '../../lib/format.ts';

export function NotAllowed({ role }: { role: string }) {
  return (
    <div data-testid="not-allowed" className="max-w-2xl rounded-xl border-2 border-line bg-card p-6">
      <h1 className="text-2xl font-bold">You are not allowed to open this page</h1>
      <p className="mt-2 text-ink-soft">
        This page needs a different role. You are signed in as <strong>{roleLabel(role)}</strong>. If you need
        access, ask your lab administrator.
      </p>
      <Link to="/" className="mt-4 inline-flex min-h-12 items-center font-semibold text-brass-600 underline underline-offset-4">
        Back to home
      </Link>
    </div>
  );
}
