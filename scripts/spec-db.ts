/**
 * A database for iterating on API specs by hand: starts (or reuses) a throwaway cluster in
 * `.data/spec-pg` on DRIFTMARK_SPEC_PG_PORT (15499), recreates the database named on the command
 * line, migrates it and prints its URL. Several people (or helper sessions) each take their own
 * database name on the one cluster.
 *
 *   DATABASE_URL=$(npx tsx scripts/spec-db.ts mine) \
 *     node --import tsx scripts/run-jasmine.ts spec/support/jasmine-api.json spec/api/sets.spec.ts
 */
import { join } from 'node:path';
import { recreateDatabase, startCluster } from './cluster';
import { runMigrations } from './migrate';

const name = (process.argv[2] ?? 'spec').replace(/[^a-z0-9_]/gi, '_');
const port = Number(process.env.DRIFTMARK_SPEC_PG_PORT || 15499);
const cluster = await startCluster({ dataDir: join(process.cwd(), '.data', 'spec-pg'), port, throwaway: true, log: (s) => console.error(s) });
const url = await recreateDatabase(cluster, `driftmark_spec_${name}`);
await runMigrations(url);
console.log(url);
