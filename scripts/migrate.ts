/** Applies the committed Drizzle migrations (schema/migrations). Used by start, tests and bench. */
import { drizzle } from 'drizzle-orm/node-postgres';
import { migrate } from 'drizzle-orm/node-postgres/migrator';
import { join } from 'node:path';
import pg from 'pg';
import { PROJECT_ROOT } from './cluster';

export const MIGRATIONS_FOLDER = join(PROJECT_ROOT, 'schema', 'migrations');

export async function runMigrations(databaseUrl: string): Promise<void> {
  const pool = new pg.Pool({ connectionString: databaseUrl, max: 1 });
  try {
    await migrate(drizzle(pool), { migrationsFolder: MIGRATIONS_FOLDER });
  } finally {
    await pool.end();
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const url = process.env.DATABASE_URL;
  if (!url) {
    console.error('Set DATABASE_URL (npm start migrates its own cluster by itself).');
    process.exit(2);
  }
  runMigrations(url).then(
    () => console.log('Migrations applied.'),
    (e) => {
      console.error(e);
      process.exit(1);
    },
  );
}
