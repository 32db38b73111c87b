/** Lab settings: one row per key in `settings`, the value as JSON text. */
import {
  DEFAULT_LAB_SETTINGS,
  labSettingsSchema,
  type LabSettings,
  type UpdateLabSettingsInput,
} from '../../shared/schemas/settings.ts';
import type { Transaction } from 'sequelize';
import { Setting } from '../db/models/index.ts';
import { diffFields, writeTransaction } from '../db/transaction.ts';
import { recordAudit } from './audit.service.ts';
import { forgetIdleTimeout } from './sessions.service.ts';

/**
 * The last parsed settings, keyed on the text of the stored rows as just read: the rows are read on every call,
 * so a change (here, in another process, or by hand) gives a new key and is parsed at once; only the repeated
 * validation of unchanged rows is saved. One entry, replaced whenever the rows differ. Callers get a copy.
 */
let lastParsed: { key: string; settings: LabSettings } | null = null;

export async function getSettings(transaction?: Transaction): Promise<LabSettings> {
  const rows = await Setting.findAll({ attributes: ['key', 'value'], transaction });
  const stored = Object.fromEntries(rows.map((r) => [r.key, r.value]));
  const key = JSON.stringify(stored);
  if (lastParsed?.key === key) return structuredClone(lastParsed.settings);
  const settings = parseSettings(stored);
  lastParsed = { key, settings: structuredClone(settings) };
  return settings;
}

function parseSettings(stored: Record<string, unknown>): LabSettings {
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

/**
 * Saves the given keys and records one `setting_change` entry per key that changed, with the old and new
 * value (room conditions field by field), in the same transaction (REQUIREMENTS AT-01, AT-08).
 */
export async function updateSettings(
  input: UpdateLabSettingsInput,
  actor: { id: number; fullName: string },
): Promise<LabSettings> {
  const saved = await writeTransaction(async (transaction) => {
    const current = await getSettings(transaction);
    const next: LabSettings = labSettingsSchema.parse({
      ...current,
      ...input,
      defaultRoomConditions: { ...current.defaultRoomConditions, ...(input.defaultRoomConditions ?? {}) },
    });
    for (const key of Object.keys(input) as (keyof LabSettings)[]) {
      const oldValue = current[key];
      const newValue = next[key];
      const changes =
        key === 'defaultRoomConditions'
          ? diffFields(current.defaultRoomConditions, next.defaultRoomConditions).map((c) => ({ ...c, field: `${key}.${c.field}` }))
          : diffFields({ [key]: oldValue }, { [key]: newValue });
      if (changes.length === 0) continue;
      await Setting.upsert({ key, value: newValue, updatedAt: new Date().toISOString() }, { transaction });
      await recordAudit({ actor, action: 'setting_change', entity: 'setting', entityId: key, changes }, transaction);
    }
    return next;
  });
  forgetIdleTimeout(); // a new idle timeout applies from the next request (after commit)
  return saved;
}
