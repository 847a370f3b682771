import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import { createApp } from '../../api/app';
import { createDatabase } from '../../api/db';
import { portInUse, startCluster, stopCluster, type Cluster } from '../../scripts/cluster';
import { apiEnv, testConfig } from '../support/api-env';

describe('GET /api/health', () => {
  it('answers ok with the database up', async () => {
    const env = await apiEnv();
    const r = await request(env.app).get('/api/health');
    expect(r.status).toBe(200);
    expect(r.body).toEqual({ status: 'ok', database: 'up' });
  });

  describe('with a cluster of its own that it stops and restarts', () => {
    let cluster: Cluster;
    beforeAll(async () => {
      const dataDir = mkdtempSync(join(tmpdir(), 'driftmark-health-'));
      let port = Number(process.env.DRIFTMARK_HEALTH_PG_PORT || 15450);
      while (await portInUse(port)) port++;
      cluster = await startCluster({ dataDir, port, throwaway: true, log: () => undefined });
    }, 60_000);
    afterAll(() => stopCluster(cluster, 'immediate'));

    it('answers 503 degraded while PostgreSQL is down and recovers without a restart', async () => {
      const env = await apiEnv();
      const database = createDatabase(cluster.url);
      const app = createApp({ config: testConfig(), database, outbox: env.queue });
      try {
        expect((await request(app).get('/api/health')).body).toEqual({ status: 'ok', database: 'up' });
        stopCluster(cluster, 'fast');
        const down = await request(app).get('/api/health');
        expect(down.status).toBe(503);
        expect(down.body).toEqual({ status: 'degraded', database: 'down' });
        // Other routes keep answering JSON errors, and the process does not crash.
        const signIn = await request(app).post('/api/auth/sign-in').send({ email: 'x@spec.example', password: 'whatever-pw' });
        expect(signIn.status).toBe(503);
        expect(signIn.body.error.code).toBe('database-unavailable');
        await startCluster({ dataDir: join(cluster.pgDir, '..'), port: cluster.port, throwaway: true, log: () => undefined });
        const up = await request(app).get('/api/health');
        expect(up.status).toBe(200);
        expect(up.body).toEqual({ status: 'ok', database: 'up' });
      } finally {
        await database.close();
      }
    }, 60_000);
  });
});

describe('API and app shell routing', () => {
  it('answers an unknown API route with a JSON 404, never the app shell', async () => {
    const env = await apiEnv();
    const r = await request(env.app).get('/api/no-such-thing').set('Accept', 'text/html');
    expect(r.status).toBe(404);
    expect(r.headers['content-type']).toContain('application/json');
    expect(r.body.error.code).toBe('no-such-route');
  });

  it('serves the app shell to an HTML GET of a deep link, with the security headers', async () => {
    const env = await apiEnv();
    const r = await request(env.app).get('/admin/users?page=2').set('Accept', 'text/html,application/xhtml+xml');
    expect(r.status).toBe(200);
    expect(r.text).toContain('<app-root>');
    expect(r.headers['content-security-policy']).toContain("script-src 'self'");
    expect(r.headers['x-content-type-options']).toBe('nosniff');
    expect(r.headers['access-control-allow-origin']).toBeUndefined();
  });

  it('answers a non-HTML GET of an unknown path with 404 JSON', async () => {
    const env = await apiEnv();
    const r = await request(env.app).get('/nothing.png').set('Accept', 'image/png');
    expect(r.status).toBe(404);
  });
});
