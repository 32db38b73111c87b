export type PreparationListParams = {
  mine?: boolean;
  today?: boolean;
  status?: string;
  search?: string;
  page?: number;
  pageSize?: number;
};

export const preparationKeys = {
  all: ['preparations'] as const,
  lists: () => [...preparationKeys.all, 'list'] as const,
  list: (params: PreparationListParams) => [...preparationKeys.lists(), params] as const,
  details: () => [...preparationKeys.all, 'detail'] as const,
  detail: (key: string) => [...preparationKeys.details(), key] as const,
  preview: (body: unknown) => [...preparationKeys.all, 'preview', body] as const,
};

export const pickerKeys = {
  all: ['pickers'] as const,
  materials: () => [...pickerKeys.all, 'materials'] as const,
  balances: () => [...pickerKeys.all, 'balances'] as const,
  flasks: () => [...pickerKeys.all, 'flasks'] as const,
  solvents: () => [...pickerKeys.all, 'solvents'] as const,
};
