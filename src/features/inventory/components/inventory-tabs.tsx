import { NavLink } from 'react-router';
import { INVENTORY_KINDS, KIND_INFO } from '../kinds.ts';

/** The four registers side by side, so a chemist can switch without opening the menu. */
export function InventoryTabs() {
  return (
    <nav aria-label="Inventory registers" className="mb-5 flex flex-wrap gap-2">
      {INVENTORY_KINDS.map((k) => (
        <NavLink
          key={k}
          to={KIND_INFO[k].pagePath}
          data-testid={`tab-${k}`}
          className={({ isActive }) =>
            `inline-flex min-h-12 items-center rounded-lg border-2 px-4 font-semibold ${
              isActive ? 'border-slate-700 bg-slate-700 text-white' : 'border-line bg-card text-ink hover:border-slate-700'
            }`
          }
        >
          {KIND_INFO[k].title}
        </NavLink>
      ))}
    </nav>
  );
}
