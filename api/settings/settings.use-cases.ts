import { sql } from 'drizzle-orm';
import { instanceSettings } from '../../schema/index';
import type { Tx } from '../db';

export interface InstanceSettings {
  /** Open self sign-up for independent hobbyists (technician role). */
  openSignUp: boolean;
}

const DEFAULTS: InstanceSettings = { openSignUp: false };
const KEYS: Record<keyof InstanceSettings, string> = { openSignUp: 'open-sign-up' };

export async function getSettings(tx: Tx): Promise<InstanceSettings> {
  const rows = await tx.select().from(instanceSettings);
  const out = { ...DEFAULTS };
  for (const [field, key] of Object.entries(KEYS) as [keyof InstanceSettings, string][]) {
    const row = rows.find((r) => r.key === key);
    if (row) out[field] = row.value as InstanceSettings[typeof field];
  }
  return out;
}

export async function updateSettings(tx: Tx, patch: Partial<InstanceSettings>, by: number): Promise<InstanceSettings> {
  for (const [field, value] of Object.entries(patch) as [keyof InstanceSettings, unknown][]) {
    await tx
      .insert(instanceSettings)
      .values({ key: KEYS[field], value, updatedBy: by })
      .onConflictDoUpdate({ target: instanceSettings.key, set: { value, updatedBy: by, updatedAt: sql`now()` } });
  }
  return getSettings(tx);
}
