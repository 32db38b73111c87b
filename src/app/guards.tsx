import { Navigate, Outlet, useLocation } from 'react-router';
import { useAuth } from '../features/auth/use-auth.ts';
import type { Role } from '../features/auth/types.ts';
import { Banner, Spinner } from '../components/ui/feedback.tsx';
import { Button } from '../components/ui/button.tsx';
import { NotAllowed } from '../components/errors/not-allowed.tsx';
import { ChangePasswordPage } from '../features/auth/change-password-page.tsx';

/** Signed-out users go to /sign-in; the page they wanted is remembered for after sign-in. */
export function RequireAuth() {
  const auth = useAuth();
  const location = useLocation();
  if (auth.status === 'loading') {
    return (
      <div className="min-h-screen">
        <Spinner label="Checking your session…" />
      </div>
    );
  }
  if (auth.status === 'error') {
    return (
      <div className="mx-auto max-w-xl p-6">
        <Banner title="Tarebook could not check your session">{auth.error.message}</Banner>
        <Button className="mt-4" onClick={auth.refetch}>
          Try again
        </Button>
      </div>
    );
  }
  if (auth.status === 'signed-out') {
    const from = location.pathname + location.search;
    return <Navigate to="/sign-in" replace state={{ from }} />;
  }
  // A password an administrator set: nothing else until the person chooses their own (the server refuses all else).
  if (auth.user.mustChangePassword) return <ChangePasswordPage forced />;
  return <Outlet />;
}

/**
 * Hides pages from roles that may not use them. This is a courtesy for the user:
 * the server checks the role on every API route regardless.
 */
export function RequireRole({ roles }: { roles: readonly Role[] }) {
  const auth = useAuth();
  if (auth.status !== 'signed-in') return null;
  if (!roles.includes(auth.user.role)) return <NotAllowed role={auth.user.role} />;
  return <Outlet />;
}
