/**
 * Groups `api` and `auth`: the real server on a throwaway PostgreSQL cluster, loaded with
 * autocannon from this process against 127.0.0.1 only. Everything started here is stopped and
 * every temporary folder removed at the end, also on error or Ctrl-C.
 */
import { fork, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import autocannon from 'autocannon';
import { createDatabase } from '../api/db';
import { startCluster, stopCluster, type Cluster } from '../scripts/cluster';
import { runMigrations } from '../scripts/migrate';
import { DEMO_ACCOUNTS, DEMO_PASSWORD, seedDemo } from '../seeds/seed';
import { DIGITAL_METER, GUARDED_RULE } from './lib/fixtures';
import { progress, round, type Figure } from './lib/stats';
import { stopChild } from './lib/child';

const PG_PORT = 15440;
const HERE = new URL('.', import.meta.url).pathname;

/**
 * A guarded-rule verdict with a meter profile: the worked case of check-values.md §3 (100 kΩ
 * ±10 %, 104.2 kΩ on the 200 k range of a 2000-count ±(0.8 % + 2) meter) as a technician's body.
 */
export const VERDICT_BODY = {
  expected: 100000,
  reading: '104.2k',
  tolerancePct: 10,
  kind: 'carbon-composition',
  method: 'lead-lifted',
  rule: GUARDED_RULE,
  meter: DIGITAL_METER,
};
/** The trivial JSON route of the same app: parse one value (no database, no network). */
export const TRIVIAL_BODY = { text: '4k7' };

interface LoadResult {
  rps: number;
  p50: number;
  p99: number;
  requests: number;
  errors: number;
  timeouts: number;
  non2xx: number;
  status429: number;
  statusCodes: Record<string, number>;
  durationS: number;
  connections: number;
}

async function load(opts: { url: string; path: string; method?: 'GET' | 'POST'; body?: unknown; headers?: Record<string, string>; connections: number; duration: number }): Promise<LoadResult> {
  const result = await autocannon({
    url: opts.url + opts.path,
    method: opts.method ?? 'GET',
    connections: opts.connections,
    duration: opts.duration,
    headers: { ...(opts.body !== undefined ? { 'content-type': 'application/json' } : {}), ...opts.headers },
    body: opts.body === undefined ? undefined : JSON.stringify(opts.body),
  });
  const statusCodes: Record<string, number> = {};
  for (const [code, v] of Object.entries(result.statusCodeStats ?? {})) statusCodes[code] = (v as { count: number }).count;
  const completed = result.requests.total;
  return {
    rps: completed / result.duration,
    p50: result.latency.p50,
    p99: result.latency.p99,
    requests: completed,
    errors: result.errors,
    timeouts: result.timeouts,
    non2xx: result.non2xx,
    status429: statusCodes['429'] ?? 0,
    statusCodes,
    durationS: result.duration,
    connections: opts.connections,
  };
}

function loadFigures(name: string, what: string, r: LoadResult, p99Target: number | null = null, p99Source?: string): Figure[] {
  const details = {
    route: what,
    connections: r.connections,
    durationS: r.durationS,
    requests: r.requests,
    p50Ms: r.p50,
    p99Ms: r.p99,
    errors: r.errors,
    timeouts: r.timeouts,
    non2xx: r.non2xx - r.status429,
    status429: r.status429,
    statusCodes: r.statusCodes,
  };
  return [
    { figure: `${name}.throughput`, value: round(r.rps), unit: 'req/s', target: null, ...details },
    {
      figure: `${name}.latency-p99`,
      value: r.p99,
      unit: 'ms',
      stat: 'p99',
      target: p99Target,
      ...(p99Target !== null ? { source: p99Source, gating: false } : {}),
      p50Ms: r.p50,
      route: what,
    },
  ];
}

/** A short unreported run so the JIT and the pools are warm before the measured run. */
async function warm(url: string, path: string, body?: unknown, headers?: Record<string, string>, method: 'GET' | 'POST' = body === undefined ? 'GET' : 'POST'): Promise<void> {
  await load({ url, path, method, body, headers, connections: 8, duration: 2 });
}

async function problemSample(url: string, path: string, init: RequestInit): Promise<void> {
  const res = await fetch(url + path, init);
  progress(`sample ${init.method ?? 'GET'} ${path} → ${res.status} ${(await res.text()).slice(0, 300)}`);
}

export async function runServerGroups(emit: (f: Figure) => void, groups: { api: boolean; auth: boolean }): Promise<void> {
  const temp: string[] = [];
  const mk = (tag: string) => {
    const d = mkdtempSync(join(tmpdir(), `driftmark-bench-${tag}-`));
    temp.push(d);
    return d;
  };
  let cluster: Cluster | null = null;
  let child: ChildProcess | null = null;
  let cleaned = false;
  const cleanup = async (): Promise<void> => {
    if (cleaned) return;
    cleaned = true;
    await stopChild(child);
    if (cluster) {
      try {
        stopCluster(cluster, 'fast');
      } catch (e) {
        progress(`stopping the cluster: ${(e as Error).message}`);
      }
    }
    for (const d of temp) rmSync(d, { recursive: true, force: true });
    progress('server, mail fake and cluster stopped; temporary folders removed');
  };
  const onSignal = () => {
    void cleanup().then(() => process.exit(130));
  };
  process.once('SIGINT', onSignal);
  process.once('SIGTERM', onSignal);
  try {
    const t0 = Date.now();
    const clusterDir = mk('pg');
    cluster = await startCluster({ dataDir: clusterDir, port: PG_PORT, throwaway: true, log: progress });
    await runMigrations(cluster.url);
    const database = createDatabase(cluster.url, { max: 2 });
    try {
      await seedDemo(database.db, { NODE_ENV: 'development' });
    } finally {
      await database.close();
    }
    child = fork(join(HERE, 'api-server.ts'), [], {
      execArgv: ['--import', 'tsx'],
      env: {
        ...process.env,
        BENCH_DATABASE_URL: cluster.url,
        BENCH_JWT_SECRET: randomBytes(36).toString('base64url'),
        BENCH_APP_DATA_DIR: mk('data'),
        BENCH_APP_DIST_DIR: mk('dist'),
      },
      stdio: ['ignore', 'ignore', 'inherit', 'ipc'],
    });
    const c = child;
    const url = await new Promise<string>((resolve, reject) => {
      c.once('message', (m) => resolve((m as { url: string }).url));
      c.once('exit', (code) => reject(new Error(`the bench server exited (code ${code}) before listening`)));
    });
    if (!/^http:\/\/127\.0\.0\.1:\d+$/.test(url)) throw new Error(`the bench server is not on 127.0.0.1: ${url}`);
    progress(`cluster, migrations, demo accounts and server ready in ${((Date.now() - t0) / 1000).toFixed(1)} s at ${url}`);

    if (groups.api) {
      progress('group api: POST /api/calc/verdict (32 connections, 10 s)');
      await warm(url, '/api/calc/verdict', VERDICT_BODY);
      const verdict = await load({ url, path: '/api/calc/verdict', method: 'POST', body: VERDICT_BODY, connections: 32, duration: 10 });
      if (verdict.non2xx > 0) await problemSample(url, '/api/calc/verdict', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(VERDICT_BODY) });
      progress('group api: POST /api/calc/parse {text:"4k7"}, the trivial JSON route (32 connections, 10 s)');
      await warm(url, '/api/calc/parse', TRIVIAL_BODY);
      const trivial = await load({ url, path: '/api/calc/parse', method: 'POST', body: TRIVIAL_BODY, connections: 32, duration: 10 });
      if (trivial.non2xx > 0) await problemSample(url, '/api/calc/parse', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(TRIVIAL_BODY) });
      for (const f of loadFigures('api.calc-verdict', 'POST /api/calc/verdict (guarded rule, digital meter profile)', verdict)) emit(f);
      for (const f of loadFigures('api.calc-parse', 'POST /api/calc/parse {"text":"4k7"} (the trivial JSON route: no database)', trivial)) emit(f);
      emit({
        figure: 'api.calc-verdict.ratio-to-trivial',
        value: round(verdict.rps / trivial.rps),
        unit: 'ratio',
        target: null,
        note: 'req/s of POST /api/calc/verdict divided by req/s of POST /api/calc/parse, same server, same run',
      });
      progress('group api: GET /api/health (32 connections, 10 s; a database round trip)');
      await warm(url, '/api/health');
      const health = await load({ url, path: '/api/health', connections: 32, duration: 10 });
      if (health.non2xx > 0) await problemSample(url, '/api/health', {});
      for (const f of loadFigures('api.health', 'GET /api/health (SELECT 1 on the pool)', health)) emit(f);
    }

    if (groups.auth) {
      const account = DEMO_ACCOUNTS.find((a) => a.roles.includes('technician'))!;
      const credentials = { email: account.email, password: DEMO_PASSWORD };
      const first = await fetch(url + '/api/auth/sign-in', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(credentials) });
      if (first.status !== 200) throw new Error(`sign-in as ${account.email} answered ${first.status}: ${await first.text()}`);
      const { accessToken } = (await first.json()) as { accessToken: string };
      progress('group auth: POST /api/auth/sign-in (8 connections, 10 s; bcrypt compare per request)');
      await load({ url, path: '/api/auth/sign-in', method: 'POST', body: credentials, connections: 4, duration: 1 });
      const signIn = await load({ url, path: '/api/auth/sign-in', method: 'POST', body: credentials, connections: 8, duration: 10 });
      if (signIn.non2xx > 0) await problemSample(url, '/api/auth/sign-in', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(credentials) });
      for (const f of loadFigures('auth.sign-in', `POST /api/auth/sign-in (${account.email})`, signIn, 500, 'bench brief, an aim for information')) emit(f);
      progress('group auth: GET /api/me with a bearer token (32 connections, 10 s)');
      const bearer = { authorization: `Bearer ${accessToken}` };
      await warm(url, '/api/me', undefined, bearer);
      const me = await load({ url, path: '/api/me', headers: bearer, connections: 32, duration: 10 });
      if (me.non2xx > 0) await problemSample(url, '/api/me', { headers: bearer });
      for (const f of loadFigures('auth.me', 'GET /api/me (bearer token: JWT check and one user query)', me, 20, 'bench brief, an aim for information')) emit(f);
    }
  } finally {
    await cleanup();
    process.removeListener('SIGINT', onSignal);
    process.removeListener('SIGTERM', onSignal);
  }
}
