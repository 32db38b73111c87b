export const volumeCheckKeys = {
  all: ['volume-checks'] as const,
  lists: () => [...volumeCheckKeys.all, 'list'] as const,
  list: (wareId: number | null) => [...volumeCheckKeys.lists(), { wareId }] as const,
  details: () => [...volumeCheckKeys.all, 'detail'] as const,
  detail: (key: string) => [...volumeCheckKeys.details(), key] as const,
  calibrations: () => [...volumeCheckKeys.all, 'calibration'] as const,
  calibration: (wareId: number) => [...volumeCheckKeys.calibrations(), wareId] as const,
  pickerWare: () => [...volumeCheckKeys.all, 'picker', 'ware'] as const,
  pickerBalances: () => [...volumeCheckKeys.all, 'picker', 'balances'] as const,
  balance: (id: number) => [...volumeCheckKeys.all, 'balance', id] as const,
  live: (body: unknown) => [...volumeCheckKeys.all, 'live', body] as const,
};
