/**
 * The four inventory registers: their API paths, page paths and names. One place, so the list page,
 * the detail pages, the query keys and the navigation all agree.
 */
export const INVENTORY_KINDS = ['materials', 'balances', 'volumetric-ware', 'solvents'] as const;
export type InventoryKind = (typeof INVENTORY_KINDS)[number];

export const KIND_INFO: Record<InventoryKind, { title: string; singular: string; apiPath: string; pagePath: string }> = {
  materials: { title: 'Reference materials', singular: 'reference material', apiPath: '/api/materials', pagePath: '/inventory/materials' },
  balances: { title: 'Balances', singular: 'balance', apiPath: '/api/balances', pagePath: '/inventory/balances' },
  'volumetric-ware': {
    title: 'Volumetric ware',
    singular: 'volumetric item',
    apiPath: '/api/volumetric-ware',
    pagePath: '/inventory/volumetric-ware',
  },
  solvents: { title: 'Solvents and diluents', singular: 'solvent lot', apiPath: '/api/solvents', pagePath: '/inventory/solvents' },
};

/** Roles that may create, edit, retire and upload (the server enforces the same list). */
export const INVENTORY_WRITE_ROLES = ['admin', 'chemist'] as const;
