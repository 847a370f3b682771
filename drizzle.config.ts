import { defineConfig } from 'drizzle-kit';

/** `npm run db:generate` writes SQL migrations into schema/migrations (committed). */
export default defineConfig({
  dialect: 'postgresql',
  schema: './schema/index.ts',
  out: './schema/migrations',
  casing: 'snake_case',
});
