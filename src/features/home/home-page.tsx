import { Link } from 'react-router';
import { useAuth, ROLE_ABILITIES } from '../auth/use-auth.ts';
import { roleLabel } from '../../lib/format.ts';
import { WorkLists } from './work-lists.tsx';

function Tile({ to, title, text, testId }: { to: string; title: string; text: string; testId: string }) {
  return (
    <Link
      to={to}
      data-testid={testId}
      className="group flex min-h-32 flex-col justify-between rounded-xl border-2 border-line bg-card p-5 hover:border-slate-700"
    >
      <span className="text-xl font-bold group-hover:underline group-hover:underline-offset-4">{title}</span>
      <span className="mt-2 text-ink-soft">{text}</span>
      <span aria-hidden="true" className="mt-3 font-semibold text-brass-600">
        Open →
      </span>
    </Link>
  );
}

export function HomePage() {
  const auth = useAuth();
  if (auth.status !== 'signed-in') return null;
  const { user } = auth;

  return (
    <div className="flex flex-col gap-8">
      <header>
        <p className="text-ink-soft">Signed in as {user.email}</p>
        <h1 className="mt-1 text-3xl font-bold tracking-tight">Welcome, {user.fullName}</h1>
        <p className="mt-3 inline-flex items-center gap-2 rounded-full border-2 border-slate-700 bg-card px-4 py-1 font-semibold" data-testid="home-role">
          Role: {roleLabel(user.role)}
        </p>
      </header>

      <WorkLists />

      <section aria-labelledby="abilities-title" className="rounded-xl border-2 border-line bg-card p-5">
        <h2 id="abilities-title" className="text-xl font-bold">
          What you can do in Tarebook
        </h2>
        <ul className="mt-3 list-disc space-y-1 pl-6">
          {ROLE_ABILITIES[user.role].map((a) => (
            <li key={a}>{a}</li>
          ))}
        </ul>
      </section>

      <section aria-label="Shortcuts" className="grid gap-4 sm:grid-cols-2 xl:grid-cols-3">
        <Tile
          to="/preparations"
          testId="tile-preparations"
          title="Preparations"
          text="Scan or search a standard; open its record, bench view or print page."
        />
        {user.role === 'chemist' ? (
          <Tile to="/preparations/new" testId="tile-plan" title="Plan a standard" text="Reference material, target, flask and balance: the reading to aim for, checked before anyone weighs." />
        ) : null}
        {user.role === 'qa' || user.role === 'admin' || user.role === 'chemist' ? (
          <Tile to="/trace" testId="tile-trace" title="Trace" text="Any identifier back to its lots, balances and glassware, and forward to everything made from it." />
        ) : null}
        {user.role === 'qa' || user.role === 'admin' ? (
          <Tile to="/audit" testId="tile-audit" title="Audit trail" text="Every change, signature, print and sign-in; check the chain; export CSV." />
        ) : null}
        <Tile to="/inventory/materials" testId="tile-inventory" title="Inventory" text="Reference materials, balances, volumetric ware and solvents." />
        <Tile
          to="/calculate"
          testId="tile-calculate"
          title="Calculate a standard"
          text="Mass to weigh, the balance reading to aim for, and the concentration with its uncertainty."
        />
        {user.role === 'admin' ? (
          <Tile to="/admin/users" testId="tile-users" title="Users" text="Create accounts, change roles, deactivate or unlock." />
        ) : null}
      </section>
    </div>
  );
}
