/** API paths, shared by the Express routers (relative to /api) and the client (full path). */
export const API_PREFIX = '/api';

export const apiPaths = {
  health: '/api/health',
  auth: {
    login: '/api/auth/login',
    logout: '/api/auth/logout',
    me: '/api/auth/me',
  },
  users: {
    list: '/api/users',
    create: '/api/users',
    update: (id: number | string) => `/api/users/${id}`,
    unlock: (id: number | string) => `/api/users/${id}/unlock`,
    password: (id: number | string) => `/api/users/${id}/password`,
  },
  settings: '/api/settings',
  calc: { preparation: '/api/calc/preparation' },
  materials: '/api/materials',
  balances: '/api/balances',
  volumetricWare: '/api/volumetric-ware',
  solvents: '/api/solvents',
} as const;
