import { useEffect, useState } from 'react';
import { NavLink, Outlet, useLocation, useNavigate } from 'react-router';
import { Brand } from './brand.tsx';
import { useAuth } from '../features/auth/use-auth.ts';
import { useSignOut } from '../features/auth/api/sign-out.ts';
import { useSignOutEverywhere } from '../features/auth/api/account.ts';
import type { Role } from '../features/auth/types.ts';
import { roleLabel } from '../lib/format.ts';
import { ScanBox } from '../features/scan/scan-box.tsx';
import { useQuery } from '@tanstack/react-query';
import { settingsQueries } from '../features/calculate/api/settings-queries.ts';
import { zoneNote } from '../../shared/prep/lab-time.ts';

/** The date convention and the lab's time zone, stated once per page (every date and time on it is in that zone). */
function ZoneNote() {
  const tz = useQuery(settingsQueries.detail()).data?.timeZone;
  if (!tz) return null;
  return (
    <p className="mt-8 border-t border-line pt-3 text-sm text-ink-soft" data-testid="zone-note">
      {zoneNote(tz)}
    </p>
  );
}

type NavItem = { to: string; label: string; roles?: readonly Role[]; end?: boolean; testId: string; group?: string };

/** Navigation follows the role. Only pages that exist are listed. */
const NAV: NavItem[] = [
  { to: '/', label: 'Home', end: true, testId: 'nav-home' },
  { to: '/calculate', label: 'Calculate', testId: 'nav-calculate' },
  { to: '/buoyancy', label: 'Buoyancy table', testId: 'nav-buoyancy' },
  { to: '/preparations', label: 'Preparations', end: true, testId: 'nav-preparations' },
  { to: '/preparations/new', label: 'Plan a standard', roles: ['chemist'], testId: 'nav-plan' },
  { to: '/series', label: 'Calibration series', testId: 'nav-series' },
  { to: '/glassware', label: 'Glassware checks', roles: ['chemist', 'technician', 'qa', 'admin'], testId: 'nav-glassware' },
  { to: '/inventory/materials', label: 'Materials', group: 'Inventory', testId: 'nav-inventory-materials' },
  { to: '/inventory/balances', label: 'Balances', group: 'Inventory', testId: 'nav-inventory-balances' },
  { to: '/inventory/volumetric-ware', label: 'Volumetric ware', group: 'Inventory', testId: 'nav-inventory-ware' },
  { to: '/inventory/solvents', label: 'Solvents', group: 'Inventory', testId: 'nav-inventory-solvents' },
  { to: '/trace', label: 'Trace', roles: ['qa', 'admin', 'chemist'], testId: 'nav-trace' },
  { to: '/audit', label: 'Audit trail', roles: ['qa', 'admin'], testId: 'nav-audit' },
  { to: '/sessions', label: 'Active sessions', roles: ['qa', 'admin'], testId: 'nav-sessions' },
  { to: '/admin/users', label: 'Users', roles: ['admin'], testId: 'nav-users' },
  { to: '/admin/outbox', label: 'Outbox', roles: ['admin'], testId: 'nav-outbox' },
  { to: '/admin/settings', label: 'Lab settings', roles: ['admin'], testId: 'nav-settings' },
  { to: '/admin/label-templates', label: 'Label templates', roles: ['admin'], testId: 'nav-label-templates' },
];

function NavList({ role, onNavigate }: { role: Role; onNavigate?: () => void }) {
  return (
    <ul className="flex flex-col gap-1">
      {NAV.filter((n) => !n.roles || n.roles.includes(role)).map((n, i, shown) => (
        <li key={n.to}>
          {n.group && n.group !== shown[i - 1]?.group ? (
            <span className="mt-2 block px-4 pb-1 text-sm font-semibold uppercase tracking-wide text-slate-100/75">{n.group}</span>
          ) : null}
          <NavLink
            to={n.to}
            end={n.end}
            onClick={onNavigate}
            data-testid={n.testId}
            className={({ isActive }) =>
              `flex min-h-12 items-center rounded-lg border-l-4 px-4 text-lg font-semibold ${n.group ? 'pl-7' : ''} ${
                isActive ? 'border-brass-400 bg-white/12 text-white' : 'border-transparent text-slate-100 hover:bg-white/8'
              }`
            }
          >
            {n.label}
          </NavLink>
        </li>
      ))}
    </ul>
  );
}

function UserCard({ onSignedOut }: { onSignedOut?: () => void }) {
  const auth = useAuth();
  const signOut = useSignOut();
  const everywhere = useSignOutEverywhere();
  const navigate = useNavigate();
  if (auth.status !== 'signed-in') return null;
  const { user } = auth;
  return (
    <div className="flex flex-col gap-3 border-t border-white/15 pt-4">
      <div className="flex items-center gap-3">
        <span aria-hidden="true" className="flex size-11 items-center justify-center rounded-full bg-brass-400 font-bold text-slate-900">
          {user.initials}
        </span>
        <span className="min-w-0">
          <span className="block truncate font-semibold text-white" data-testid="current-user">
            {user.fullName}
          </span>
          <span className="block text-sm text-slate-100/85" data-testid="current-role">
            {roleLabel(user.role)}
          </span>
        </span>
      </div>
      <button
        type="button"
        data-testid="sign-out"
        onClick={() =>
          signOut.mutate(undefined, {
            onSettled: () => {
              onSignedOut?.();
              navigate('/sign-in', { replace: true });
            },
          })
        }
        disabled={signOut.isPending}
        className="min-h-12 rounded-lg border-2 border-white/40 px-4 font-semibold text-white hover:bg-white/10"
      >
        {signOut.isPending ? 'Signing out…' : 'Sign out'}
      </button>
      <div className="flex flex-wrap gap-2">
        <NavLink
          to="/account/password"
          onClick={onSignedOut}
          data-testid="nav-change-password"
          className="flex min-h-12 flex-1 items-center justify-center rounded-lg border-2 border-white/25 px-3 text-sm font-semibold text-slate-100 hover:bg-white/10"
        >
          Change password
        </NavLink>
        <button
          type="button"
          data-testid="sign-out-everywhere"
          disabled={everywhere.isPending}
          onClick={() => {
            if (!window.confirm('Sign out on every device where this account is signed in, this one included?')) return;
            everywhere.mutate(undefined, {
              onSettled: () => {
                onSignedOut?.();
                navigate('/sign-in', { replace: true });
              },
            });
          }}
          className="min-h-12 flex-1 rounded-lg border-2 border-white/25 px-3 text-sm font-semibold text-slate-100 hover:bg-white/10"
        >
          {everywhere.isPending ? 'Signing out…' : 'Sign out everywhere'}
        </button>
      </div>
    </div>
  );
}

export function AppShell() {
  const auth = useAuth();
  const [menuOpen, setMenuOpen] = useState(false);
  const location = useLocation();
  useEffect(() => setMenuOpen(false), [location.pathname]);
  if (auth.status !== 'signed-in') return null;
  const role = auth.user.role;

  return (
    <div className="min-h-screen lg:grid lg:grid-cols-[17rem_1fr]">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:z-50 focus:m-2 focus:rounded focus:bg-card focus:p-3">
        Skip to content
      </a>

      {/* Desktop: fixed sidebar */}
      <div className="hidden bg-slate-900 lg:block">
        <aside className="sticky top-0 flex h-screen flex-col gap-8 overflow-y-auto p-5 text-white" aria-label="Main">
          <Brand />
          <nav aria-label="Main navigation" className="flex-1">
            <NavList role={role} />
          </nav>
          <UserCard />
        </aside>
      </div>

      {/* Narrow screens: top bar + menu */}
      <header className="sticky top-0 z-30 bg-slate-900 text-white lg:hidden">
        <div className="flex min-h-16 items-center justify-between px-4">
          <Brand />
          <button
            type="button"
            aria-expanded={menuOpen}
            aria-controls="mobile-menu"
            data-testid="menu-button"
            onClick={() => setMenuOpen((o) => !o)}
            className="flex min-h-12 min-w-12 items-center justify-center gap-2 rounded-lg border-2 border-white/40 px-4 font-semibold"
          >
            <svg aria-hidden="true" viewBox="0 0 24 24" className="size-6 fill-current">
              {menuOpen ? (
                <path d="M6.4 5 5 6.4 10.6 12 5 17.6 6.4 19l5.6-5.6 5.6 5.6 1.4-1.4-5.6-5.6L19 6.4 17.6 5 12 10.6z" />
              ) : (
                <path d="M3 6h18v2H3zm0 5h18v2H3zm0 5h18v2H3z" />
              )}
            </svg>
            Menu
          </button>
        </div>
        {menuOpen ? (
          <div id="mobile-menu" className="flex flex-col gap-6 border-t border-white/15 px-4 pb-5 pt-3">
            <nav aria-label="Main navigation">
              <NavList role={role} onNavigate={() => setMenuOpen(false)} />
            </nav>
            <UserCard onSignedOut={() => setMenuOpen(false)} />
          </div>
        ) : null}
      </header>

      <main id="main" className="mx-auto w-full max-w-[92rem] px-4 py-6 sm:px-6 lg:px-10 lg:py-8">
        <div className="mb-4 flex justify-end">
          <div className="w-full max-w-xl">
            <ScanBox />
          </div>
        </div>
        <Outlet />
        <ZoneNote />
      </main>
    </div>
  );
}
