import { isRouteErrorResponse, useRouteError } from 'react-router';
import { NotFound } from './not-found.tsx';

/** Last line of defence: shows what broke instead of a blank page. */
export function RouteError() {
  const error = useRouteError();
  if (isRouteErrorResponse(error) && error.status === 404) {
    return (
      <div className="p-6">
        <NotFound />
      </div>
    );
  }
  const message = error instanceof Error ? error.message : 'Unexpected error.';
  const chunkFailed = /dynamically imported module|Importing a module script failed/i.test(message);
  return (
    <div role="alert" className="mx-auto max-w-2xl p-6">
      <div className="rounded-xl border-2 border-bad-700 bg-card p-6">
        <h1 className="text-2xl font-bold text-bad-700">Something went wrong</h1>
        <p className="mt-2">
          {chunkFailed ? 'Tarebook was updated while this page was open. Reload to get the new version.' : message}
        </p>
        <button
          type="button"
          onClick={() => window.location.reload()}
          className="mt-4 min-h-12 rounded-lg border-2 border-slate-700 bg-slate-700 px-5 font-semibold text-white"
        >
          Reload
        </button>
      </div>
    </div>
  );
}
