/** Lab settings: one row per key in `settings`, the value as JSON text. */
import {
  DEFAULT_LAB_SETTINGS,
  labSettingsSchema,
  type LabSettings,
  type UpdateLabSettingsInput,
} from '../../shared/schemas/settings.ts';
import { Setting } from '../db/models/index.ts';

export async function getSettings(): Promise<LabSettings> {
  const rows = await Setting.findAll();
  const stored = Object.fromEntries(rows.map((r) => [r.key, r.value]));
  const merged = { ...DEFAULT_LAB_SETTINGS, ...stored } as Record<string, unknown>;
  merged.defaultRoomConditions = {
    ...DEFAULT_LAB_SETTINGS.defaultRoomConditions,
    ...((stored.defaultRoomConditions as object | undefined) ?? {}),
  };
  // Keep only known keys, in a stable order; a bad stored value falls back to the default.
  const parsed = labSettingsSchema.safeParse(merged);
  if (parsed.success) return parsed.data;
  const fixed: Record<string, unknown> = { ...DEFAULT_LAB_SETTINGS };
  for (const key of Object.keys(DEFAULT_LAB_SETTINGS) as (keyof LabSettings)[]) {
    const one = labSettingsSchema.shape[key].safeParse(merged[key]);
    if (one.success) fixed[key] = one.data;
  }
  return fixed as LabSettings;
}

export async function updateSettings(input: UpdateLabSettingsInput): Promise<LabSettings> {
  const current = await getSettings();
  const next: LabSettings = labSettingsSchema.parse({
    ...current,
    ...input,
    defaultRoomConditions: { ...current.defaultRoomConditions, ...(input.defaultRoomConditions ?? {}) },
  });
  const sequelize = Setting.sequelize!;
  await sequelize.transaction(async (transaction) => {
    for (const key of Object.keys(input) as (keyof LabSettings)[]) {
      await Setting.upsert({ key, value: next[key], updatedAt: new Date().toISOString() }, { transaction });
    }
  });
  return next;
}
