/**
 * Routes under /inventory. Pages load on demand (react-table and the forms stay out of the first bundle).
 * Create pages are for admins and chemists; the server checks the role on every write regardless.
 */
import { Navigate, type RouteObject } from 'react-router';
import { RequireRole } from '../../app/guards.tsx';
import { INVENTORY_WRITE_ROLES } from './kinds.ts';

const materials = () => import('./materials/material-pages.tsx');
const balances = () => import('./balances/balance-pages.tsx');
const ware = () => import('./volumetric-ware/ware-pages.tsx');
const solvents = () => import('./solvents/solvent-pages.tsx');

export const inventoryRoutes: RouteObject[] = [
  { index: true, element: <Navigate to="/inventory/materials" replace /> },
  { path: 'materials', lazy: async () => ({ Component: (await import('./materials/material-list.tsx')).MaterialListPage }) },
  { path: 'materials/:id', lazy: async () => ({ Component: (await materials()).MaterialDetailPage }) },
  { path: 'balances', lazy: async () => ({ Component: (await import('./balances/balance-list.tsx')).BalanceListPage }) },
  { path: 'balances/:id', lazy: async () => ({ Component: (await balances()).BalanceDetailPage }) },
  { path: 'volumetric-ware', lazy: async () => ({ Component: (await import('./volumetric-ware/ware-list.tsx')).WareListPage }) },
  { path: 'volumetric-ware/:id', lazy: async () => ({ Component: (await ware()).WareDetailPage }) },
  { path: 'solvents', lazy: async () => ({ Component: (await import('./solvents/solvent-list.tsx')).SolventListPage }) },
  { path: 'solvents/:id', lazy: async () => ({ Component: (await solvents()).SolventDetailPage }) },
  {
    element: <RequireRole roles={INVENTORY_WRITE_ROLES} />,
    children: [
      { path: 'materials/new', lazy: async () => ({ Component: (await materials()).MaterialCreatePage }) },
      { path: 'balances/new', lazy: async () => ({ Component: (await balances()).BalanceCreatePage }) },
      { path: 'volumetric-ware/new', lazy: async () => ({ Component: (await ware()).WareCreatePage }) },
      { path: 'solvents/new', lazy: async () => ({ Component: (await solvents()).SolventCreatePage }) },
    ],
  },
];
