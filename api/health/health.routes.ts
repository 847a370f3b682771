import type pg from 'pg';
import type { RouteDef } from '../http/route-table';

/** Answers within about two seconds whether or not PostgreSQL is reachable. */
async function databaseUp(pool: pg.Pool): Promise<boolean> {
  let timer: NodeJS.Timeout | undefined;
  try {
    const timeout = new Promise<never>((_, reject) => {
      timer = setTimeout(() => reject(new Error('health check timed out')), 2000);
    });
    await Promise.race([pool.query('SELECT 1'), timeout]);
    return true;
  } catch {
    return false;
  } finally {
    clearTimeout(timer);
  }
}

export function healthRoutes(pool: pg.Pool): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/health',
      access: 'public',
      summary: 'Liveness and database reachability',
      handler: async (_req, res) => {
        const up = await databaseUp(pool);
        res.setHeader('Cache-Control', 'no-store');
        res.status(up ? 200 : 503).json(up ? { status: 'ok', database: 'up' } : { status: 'degraded', database: 'down' });
      },
    },
  ];
}
