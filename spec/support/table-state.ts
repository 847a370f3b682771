/**
 * Row counts and a checksum of every application table, to prove a refused request changed
 * nothing. Excluded: the throttle's own bookkeeping (sign_in_throttle) and pg-boss's schema.
 */
import { sql } from 'drizzle-orm';
import type { Db } from '../../api/db';

export const EXCLUDED_TABLES = ['sign_in_throttle'];

export async function tableState(db: Db): Promise<Record<string, string>> {
  const tables = await db.execute<{ table_name: string }>(sql`
    select table_name from information_schema.tables
    where table_schema = 'public' and table_type = 'BASE TABLE' order by table_name`);
  const out: Record<string, string> = {};
  for (const { table_name } of tables.rows) {
    if (EXCLUDED_TABLES.includes(table_name)) continue;
    const r = await db.execute<{ n: string; sum: string | null }>(
      sql.raw(`select count(*)::text as n, md5(coalesce(string_agg(t::text, '|' order by t::text), '')) as sum from "${table_name}" t`),
    );
    out[table_name] = `${r.rows[0].n}:${r.rows[0].sum}`;
  }
  return out;
}
