/**
 * Group `survey` (issue #5, "Speed"):
 *  - open a 400-test-point survey with its verdicts (`GET /api/surveys/:id`): p50 ≤ 20 ms on a
 *    database holding 500,000 readings (the cached scaled seed);
 *  - one reading saved through the API (`POST /api/surveys/:id/readings`) at 32 concurrent clients:
 *    throughput, p50, p99 (target p99 ≤ 20 ms), beside a direct `pg` loop issuing the same
 *    statements the API sent for one save (captured from the app's own pool) in the same run
 *    (target: the API at ≥ 50 % of the loop's throughput), and beside pgbench's bare single-row
 *    insert at 32 clients for information (the physical limit of this machine).
 *
 * The scaled database (200 sets, 2,000 surveys, 500,000 readings on a 400-test-point bench chassis,
 * plus the demo seed) lives in `.data/bench-scaled/` and is reused while its seed version and the
 * migrations match (a cold build takes a minute or two); `--fresh-scaled` rebuilds it. The server
 * runs in its own process (bench/api-server.ts), as deployed.
 */
import { fork, spawnSync, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import autocannon from 'autocannon';
import pg from 'pg';
import { pino } from 'pino';
import { createApp } from '../api/app';
import { loadConfig } from '../api/config';
import { createDatabase, type Database } from '../api/db';
import type { TemplateDocument } from '../api/domain/template-format';
import type { Outbox } from '../api/mail/outbox';
import { createTemplate, publish, share } from '../api/templates/templates.use-cases';
import { findPgBin, portInUse, startCluster, stopCluster, type Cluster } from '../scripts/cluster';
import { runMigrations } from '../scripts/migrate';
import { APP_DIST, appBuildIsStale, buildApp } from '../scripts/app-build';
import { ChassisBuilder } from '../seeds/chassis/builder';
import { DEMO_DIGITAL_METER } from '../seeds/sets';
import { DEMO_PASSWORD, seedDemo } from '../seeds/seed';
import { keyToVerdict } from './grid-browser';
import { stopChild } from './lib/child';
import { mulberry32 } from './lib/prng';
import { progress, quantile, round, type Figure } from './lib/stats';

const HERE = new URL('.', import.meta.url).pathname;
const ROOT = join(HERE, '..');
const FIRST_PORT = 15452;
/** Bump when the scaled data changes shape: the cache is rebuilt. */
const SCALED_VERSION = 'scaled-v1';
export const SCALED = { sets: 200, surveysPerSet: 10, testPoints: 400, readingsPerSurvey: 250, technicians: 20 };
const TECH_EMAIL = 'tech@driftmark.example';
const SOURCE = 'issue 5, "Speed"';

/** A 400-test-point bench chassis: 40 stages of 10 resistors each, every one with parallel paths (an invented circuit). */
export function benchChassis(): TemplateDocument {
  const b = new ChassisBuilder(
    'bench',
    {
      maker: 'Bench Fixture Works',
      model: 'Forty-Stage Load',
      chassisNumber: 'BF-400',
      variants: [],
      yearFrom: 1956,
      yearTo: 1958,
      kind: 'other',
      power: 'transformer',
      hotChassis: false,
      hazardNotes: '',
      sources: [{ title: 'Generated for the bench (invented)', kind: 'other', note: '' }],
    },
    { tubesIn: true, speakerConnected: true, controls: 'as found' },
  );
  const rng = mulberry32(0xbe4c4);
  const E12 = [1, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2];
  const value = () => E12[Math.floor(rng() * 12)] * 10 ** (2 + Math.floor(rng() * 4));
  let ref = 1;
  for (let s = 1; s <= 40; s++) {
    b.stage(s, `Section ${s}`);
    const n = ['a', 'b', 'c', 'd', 'e'].map((x) => `S${s}${x.toUpperCase()}`);
    for (const j of n) b.junction(j, '');
    const pairs: [string, string][] = [
      ['chassis', n[0]],
      [n[0], n[1]],
      [n[1], n[2]],
      [n[2], n[3]],
      [n[3], n[4]],
      [n[4], 'chassis'],
      [n[0], n[2]],
      [n[1], n[3]],
      [n[2], n[4]],
      [n[0], n[4]],
    ];
    for (const [x, y] of pairs) b.r(`R${ref++}`, x, y, value(), 10, 0.5, null);
  }
  return b.build();
}

function migrationTag(): string {
  return readdirSync(join(ROOT, 'schema', 'migrations')).filter((f) => f.endsWith('.sql')).sort().join(',');
}

/** The scaled database: reused from `.data/bench-scaled/` when its marker matches, else built. */
export async function scaledDatabase(fresh: boolean): Promise<{ cluster: Cluster; built: boolean; seconds: number }> {
  const dir = join(ROOT, '.data', 'bench-scaled');
  const marker = join(dir, 'seed-version');
  const want = `${SCALED_VERSION} ${JSON.stringify(SCALED)} ${migrationTag()}`;
  const reuse = !fresh && existsSync(marker) && readFileSync(marker, 'utf8') === want;
  // A cluster left running in the folder (an interrupted run) is stopped first: it is started again on a free port.
  const binDir = findPgBin();
  if (binDir && existsSync(join(dir, 'pg', 'postmaster.pid'))) {
    try {
      stopCluster({ pgDir: join(dir, 'pg'), binDir }, 'fast');
    } catch {
      /* not running */
    }
  }
  if (!reuse && existsSync(dir)) rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  let port = FIRST_PORT;
  while (await portInUse(port)) port++;
  const started = performance.now();
  const cluster = await startCluster({ dataDir: dir, port, throwaway: true, log: progress });
  if (reuse) return { cluster, built: false, seconds: 0 };
  await runMigrations(cluster.url);
  const database = createDatabase(cluster.url, { max: 4 });
  try {
    await seedDemo(database.db, { NODE_ENV: 'development' });
    await buildScaled(database);
  } finally {
    await database.close();
  }
  writeFileSync(marker, want);
  return { cluster, built: true, seconds: (performance.now() - started) / 1000 };
}

async function buildScaled(database: Database): Promise<void> {
  const { pool, db } = database;
  progress('scaled: the 400-test-point bench chassis');
  const { rows: author } = await pool.query<{ id: number }>("SELECT id FROM users WHERE email = 'author@driftmark.example'");
  const actor = { id: author[0].id, roles: ['author', 'technician'] as const };
  const doc = benchChassis();
  const t = await createTemplate({ db }, { ...actor, roles: [...actor.roles] }, { document: doc });
  await publish({ db }, { ...actor, roles: [...actor.roles] }, t.id, 'Bench fixture');
  await share({ db }, { ...actor, roles: [...actor.roles] }, t.id, { visibility: 'public', userIds: [] });
  const { rows: version } = await pool.query<{ id: number }>('SELECT id FROM template_versions WHERE template_id = $1 AND number = 1', [t.id]);

  progress(`scaled: ${SCALED.technicians - 1} more technicians, ${SCALED.sets} sets, ${SCALED.sets * SCALED.surveysPerSet} surveys`);
  await pool.query(
    `INSERT INTO users (email, name, password_hash, roles)
     SELECT 'bench-tech-' || g || '@bench.example', 'Bench Technician ' || g, (SELECT password_hash FROM users WHERE email = $1), '{technician}'
     FROM generate_series(1, $2::int) g`,
    [TECH_EMAIL, SCALED.technicians - 1],
  );
  await pool.query(
    `WITH techs AS (SELECT id, row_number() OVER (ORDER BY id) - 1 AS i FROM users WHERE email = $1 OR email LIKE 'bench-tech-%@bench.example')
     INSERT INTO sets (owner_id, template_id, label, serial, job_status, restoration_level)
     SELECT (SELECT id FROM techs WHERE i = g % $3), $2, 'Bench set ' || g, 'BF-' || lpad(g::text, 5, '0'), 'done', 'repair'
     FROM generate_series(1, $4::int) g`,
    [TECH_EMAIL, t.id, SCALED.technicians, SCALED.sets],
  );
  const meter = JSON.stringify({ name: 'Bench DMM (2000 count)', profile: DEMO_DIGITAL_METER, checkDate: '2026-09-01' });
  const rule = JSON.stringify({ decision: 'simple', nearLimitFraction: 0.75, bandFrom: 'template' });
  const conditions = JSON.stringify({ tubesIn: true, speakerConnected: true, controls: 'as found', ambientC: 21, note: '' });
  await pool.query(
    `INSERT INTO surveys (set_id, template_version_id, version_number, purpose, state, meter, rule, conditions, started_by, created_at, updated_at, completed_at)
     SELECT s.id, $1, 1, CASE WHEN k = 1 THEN 'intake' ELSE 'periodic' END::survey_purpose, 'complete', $2::jsonb, $3::jsonb, $4::jsonb, s.owner_id,
            now() - ((11 - k) * interval '200 days'), now() - ((11 - k) * interval '200 days'), now() - ((11 - k) * interval '200 days') + interval '3 hours'
     FROM sets s CROSS JOIN generate_series(1, $5::int) k WHERE s.template_id = $6`,
    [version[0].id, meter, rule, conditions, SCALED.surveysPerSet, t.id],
  );
  const points = doc.testPoints.filter((p) => p.kind === 'component-check');
  const nominal = new Map(doc.components.map((c) => [c.key, 'ohms' in c.nominal ? c.nominal.ohms : 0]));
  const keys = points.map((p) => p.key);
  const ohms = points.map((p) => nominal.get((p as { componentKey: string }).componentKey) ?? 0);
  progress(`scaled: ${SCALED.readingsPerSurvey} readings per survey (${SCALED.sets * SCALED.surveysPerSet * SCALED.readingsPerSurvey} in all), in batches of 100 surveys`);
  const { rows: surveyIds } = await pool.query<{ id: number }>('SELECT id FROM surveys WHERE template_version_id = $1 ORDER BY id', [version[0].id]);
  for (let i = 0; i < surveyIds.length; i += 100) {
    const batch = surveyIds.slice(i, i + 100).map((r) => r.id);
    // In-circuit readings around the parallel combination (about 60 % of nominal here), written as plain ohms.
    await pool.query(
      `INSERT INTO readings (survey_id, test_point_key, client_key, text, state, ohms, method, entered_by, taken_at, created_at, updated_at)
       SELECT s.id, p.key, 'scaled-' || s.id || '-' || p.ord, round(v)::text, 'value', round(v), 'in-circuit', s.started_by, s.created_at, s.created_at, s.created_at
       FROM surveys s
       CROSS JOIN LATERAL unnest($2::text[], $3::float8[]) WITH ORDINALITY AS p(key, nominal, ord)
       CROSS JOIN LATERAL (SELECT p.nominal * (0.55 + random() * 0.1) AS v) x
       WHERE s.id = ANY($1::int[]) AND p.ord <= $4`,
      [batch, keys, ohms, SCALED.readingsPerSurvey],
    );
  }
  await pool.query('ANALYZE');
}

interface Timed {
  samples: number[];
  /** The server's own time per answer (its Server-Timing header `app;dur=`), where it sends one. */
  server: number[];
  status: Record<string, number>;
}

async function timeGet(url: string, token: string, path: string, n: number): Promise<Timed> {
  const samples: number[] = [];
  const server: number[] = [];
  const status: Record<string, number> = {};
  for (let i = 0; i < n; i++) {
    const t0 = performance.now();
    const r = await fetch(url + path, { headers: { authorization: `Bearer ${token}` } });
    await r.arrayBuffer();
    samples.push(performance.now() - t0);
    const dur = /app;dur=([\d.]+)/.exec(r.headers.get('server-timing') ?? '');
    if (dur) server.push(Number(dur[1]));
    status[r.status] = (status[r.status] ?? 0) + 1;
  }
  return { samples, server, status };
}

const clientKey = () => randomBytes(12).toString('base64url');

/** The statements the API sends for one reading save, captured from the app's own pool (in this process). */
async function captureSave(clusterUrl: string, surveyId: number, testPointKey: string, userEmail: string): Promise<{ statements: { text: string; values: unknown[] }[]; key: string }> {
  const database = createDatabase(clusterUrl, { max: 2 });
  const dataDir = mkdtempSync(join(tmpdir(), 'driftmark-bench-capture-'));
  const config = loadConfig({ NODE_ENV: 'development', JWT_SECRET: randomBytes(36).toString('base64url'), SMTP_URL: 'smtp://127.0.0.1:9' }, { dataDir, appDistDir: dataDir });
  // No mail is sent by a save: an outbox that refuses is enough.
  const outbox: Outbox = { send: async () => Promise.reject(new Error('no mail in the capture')) } as unknown as Outbox;
  const app = createApp({ config, database, outbox, log: pino({ level: 'silent' }) });
  const server = createServer(app);
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', () => r()));
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  let restore = (): void => undefined;
  try {
    const signIn = await fetch(`${base}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: userEmail, password: DEMO_PASSWORD }) });
    const { accessToken } = (await signIn.json()) as { accessToken: string };
    // A first save warms this process (the survey's grid, as on a server that has served the survey before).
    const warm = await fetch(`${base}/api/surveys/${surveyId}/readings`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', authorization: `Bearer ${accessToken}` },
      body: JSON.stringify({ testPointKey, clientKey: clientKey(), text: '4k7' }),
    });
    if (warm.status !== 201) throw new Error(`capture: the warm-up save answered ${warm.status}: ${(await warm.text()).slice(0, 300)}`);
    // Every statement any pg client of this process sends during the next save (the server is in-process).
    const seen: { text: string; values: unknown[] }[] = [];
    const key = clientKey();
    const proto = pg.Client.prototype as unknown as { query: (...a: unknown[]) => unknown };
    const original = proto.query;
    proto.query = function (this: unknown, ...args: unknown[]) {
      const [q, v] = args as [string | { text: string; values?: unknown[] }, unknown[] | undefined];
      const text = typeof q === 'string' ? q : q.text;
      const values = (typeof q === 'string' ? v : (q.values ?? v)) ?? [];
      seen.push({ text, values: [...values] });
      return original.apply(this, args);
    };
    restore = () => {
      proto.query = original;
    };
    const r = await fetch(`${base}/api/surveys/${surveyId}/readings`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', authorization: `Bearer ${accessToken}` },
      body: JSON.stringify({ testPointKey, clientKey: key, text: '4k7' }),
    });
    restore();
    if (r.status !== 201) throw new Error(`capture: the save answered ${r.status}: ${(await r.text()).slice(0, 300)}`);
    return { statements: seen, key };
  } finally {
    restore();
    server.close();
    await database.close();
    rmSync(dataDir, { recursive: true, force: true });
  }
}

/** The captured statements replayed by 32 clients for `seconds`: each iteration with a fresh client key. */
async function pgLoop(url: string, statements: { text: string; values: unknown[] }[], key: string, clients: number, seconds: number): Promise<{ rps: number; p50: number; p99: number; iterations: number }> {
  const pool = new pg.Pool({ connectionString: url, max: clients });
  const latencies: number[] = [];
  const until = performance.now() + seconds * 1000;
  const replace = (values: unknown[], fresh: string) => values.map((v) => (v === key ? fresh : typeof v === 'string' && v.includes(key) ? v.split(key).join(fresh) : v));
  const worker = async () => {
    const client = await pool.connect();
    try {
      while (performance.now() < until) {
        const fresh = clientKey();
        const t0 = performance.now();
        for (const s of statements) await client.query(s.text, replace(s.values, fresh) as unknown[]);
        latencies.push(performance.now() - t0);
      }
    } finally {
      client.release();
    }
  };
  await Promise.all(Array.from({ length: clients }, worker));
  await pool.end();
  latencies.sort((a, b) => a - b);
  return { rps: latencies.length / seconds, p50: quantile(latencies, 0.5), p99: quantile(latencies, 0.99), iterations: latencies.length };
}

function pgbench(cluster: Cluster, clients: number, seconds: number): { tps: number; latencyMs: number } | null {
  const bin = join(cluster.binDir, 'pgbench');
  if (!existsSync(bin)) return null;
  const u = new URL(cluster.url);
  const script = join(mkdtempSync(join(tmpdir(), 'driftmark-pgbench-')), 'insert.sql');
  writeFileSync(script, 'INSERT INTO bench_bare (v) VALUES (1);\n');
  const env = { ...process.env, PGPASSWORD: decodeURIComponent(u.password) };
  const args = ['-h', u.hostname, '-p', u.port, '-U', decodeURIComponent(u.username), u.pathname.slice(1)];
  spawnSync(join(cluster.binDir, 'psql'), [...args, '-c', 'CREATE TABLE IF NOT EXISTS bench_bare (id bigserial PRIMARY KEY, v int)'], { env });
  const r = spawnSync(bin, ['-n', '-c', String(clients), '-j', '2', '-T', String(seconds), '-f', script, ...args], { env, encoding: 'utf8' });
  const tps = /tps = ([\d.]+)/.exec(r.stdout ?? '');
  const lat = /latency average = ([\d.]+) ms/.exec(r.stdout ?? '');
  if (!tps) {
    progress(`pgbench: ${(r.stderr ?? '').slice(0, 300)}`);
    return null;
  }
  return { tps: Number(tps[1]), latencyMs: lat ? Number(lat[1]) : Number.NaN };
}

export async function runSurvey(emit: (f: Figure) => void, opts: { freshScaled?: boolean } = {}): Promise<void> {
  const temp: string[] = [];
  let cluster: Cluster | null = null;
  let child: ChildProcess | null = null;
  let pool: pg.Pool | null = null;
  const mk = (tag: string) => {
    const d = mkdtempSync(join(tmpdir(), `driftmark-bench-${tag}-`));
    temp.push(d);
    return d;
  };
  try {
    const scaled = await scaledDatabase(opts.freshScaled === true);
    cluster = scaled.cluster;
    emit({ figure: 'survey.scaled-database', value: round(scaled.seconds), unit: 's', target: null, built: scaled.built, ...SCALED, note: scaled.built ? 'built now (cached in .data/bench-scaled for the next run)' : 'reused from .data/bench-scaled' });
    pool = new pg.Pool({ connectionString: cluster.url, max: 4 });
    const { rows: counts } = await pool.query<{ readings: string; surveys: string; sets: string }>('SELECT (SELECT count(*) FROM readings) readings, (SELECT count(*) FROM surveys) surveys, (SELECT count(*) FROM sets) sets');

    // Two draft surveys of the demo technician's first bench set: one with 400 readings to open, one to save into.
    const { rows: techRow } = await pool.query<{ id: number }>('SELECT id FROM users WHERE email = $1', [TECH_EMAIL]);
    const techId = techRow[0].id;
    const { rows: setRow } = await pool.query<{ id: number; version_id: number }>(
      `SELECT s.id, v.id version_id FROM sets s JOIN template_versions v ON v.template_id = s.template_id AND v.number = 1 WHERE s.owner_id = $1 AND s.label LIKE 'Bench set %' ORDER BY s.id LIMIT 1`,
      [techId],
    );
    const doc = benchChassis();
    const keys = doc.testPoints.map((p) => p.key);
    const meter = JSON.stringify({ name: 'Bench DMM (2000 count)', profile: DEMO_DIGITAL_METER, checkDate: '2026-09-01' });
    const rule = JSON.stringify({ decision: 'simple', nearLimitFraction: 0.75, bandFrom: 'template' });
    const conditions = JSON.stringify({ tubesIn: true, speakerConnected: true, controls: 'as found', ambientC: 21, note: '' });
    const newSurvey = async () =>
      (
        await pool!.query<{ id: number }>(
          `INSERT INTO surveys (set_id, template_version_id, version_number, purpose, state, meter, rule, conditions, started_by) VALUES ($1, $2, 1, 'periodic', 'draft', $3, $4, $5, $6) RETURNING id`,
          [setRow[0].id, setRow[0].version_id, meter, rule, conditions, techId],
        )
      ).rows[0].id;
    const openId = await newSurvey();
    const nominal = new Map(doc.components.map((c) => [c.key, 'ohms' in c.nominal ? c.nominal.ohms : 0]));
    const ohms = doc.testPoints.map((p) => (p.kind === 'component-check' ? (nominal.get(p.componentKey) ?? 0) : 0));
    await pool.query(
      `INSERT INTO readings (survey_id, test_point_key, client_key, text, state, ohms, method, entered_by)
       SELECT $1::int, p.key, 'open-' || $1::int || '-' || p.ord, round(p.nominal * 0.6)::text, 'value', round(p.nominal * 0.6), 'in-circuit', $4
       FROM unnest($2::text[], $3::float8[]) WITH ORDINALITY AS p(key, nominal, ord)`,
      [openId, keys, ohms, techId],
    );
    const saveId = await newSurvey();
    const keyId = await newSurvey();
    progress('survey: the app build (only when stale), for the browser figure');
    if (appBuildIsStale()) buildApp(progress, true);

    child = fork(join(HERE, 'api-server.ts'), [], {
      execArgv: ['--import', 'tsx'],
      env: { ...process.env, BENCH_DATABASE_URL: cluster.url, BENCH_JWT_SECRET: randomBytes(36).toString('base64url'), BENCH_APP_DATA_DIR: mk('survey-data'), BENCH_APP_DIST_DIR: APP_DIST },
      stdio: ['ignore', 'ignore', 'inherit', 'ipc'],
    });
    const c = child;
    const url = await new Promise<string>((resolve, reject) => {
      c.once('message', (m) => resolve((m as { url: string }).url));
      c.once('exit', (code) => reject(new Error(`the bench server exited (code ${code}) before listening`)));
    });
    const signIn = await fetch(`${url}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: TECH_EMAIL, password: DEMO_PASSWORD }) });
    if (signIn.status !== 200) throw new Error(`sign-in answered ${signIn.status}`);
    const { accessToken } = (await signIn.json()) as { accessToken: string };

    // --- Open a 400-point survey.
    progress('survey: GET /api/surveys/:id (400 readings with verdicts), 30 warm-up and 200 timed requests, one at a time');
    await timeGet(url, accessToken, `/api/surveys/${openId}`, 30);
    const opened = await timeGet(url, accessToken, `/api/surveys/${openId}`, 200);
    const sorted = [...opened.samples].sort((a, b) => a - b);
    const serverSorted = [...opened.server].sort((a, b) => a - b);
    const sample = (await (await fetch(`${url}/api/surveys/${openId}`, { headers: { authorization: `Bearer ${accessToken}` } })).json()) as { readings?: unknown[]; evaluations?: Record<string, unknown> };
    emit({
      figure: 'survey.open-400.server-p50',
      value: round(quantile(serverSorted, 0.5)),
      unit: 'ms',
      stat: 'p50',
      target: 20,
      source: `${SOURCE}: open a 400-test-point survey with verdicts, p50 ≤ 20 ms server time on 500,000 readings`,
      p95Ms: round(quantile(serverSorted, 0.95)),
      samples: serverSorted.length,
      note: "the server's own time from the request's arrival to the body made (its Server-Timing header): token check, access, queries, verdicts, JSON",
    });
    emit({
      figure: 'survey.open-400.round-trip-p50',
      value: round(quantile(sorted, 0.5)),
      unit: 'ms',
      stat: 'p50',
      target: null,
      p95Ms: round(quantile(sorted, 0.95)),
      status: opened.status,
      readingsInView: sample.readings?.length ?? null,
      evaluationsInView: sample.evaluations ? Object.keys(sample.evaluations).length : null,
      databaseReadings: Number(counts[0].readings),
      databaseSurveys: Number(counts[0].surveys),
      databaseSets: Number(counts[0].sets),
      bytes: JSON.stringify(sample).length,
      note: 'measured at the client on 127.0.0.1: HTTP, the body sent and read (for information)',
    });

    // --- Save readings at 32 clients.
    const CLIENTS = 32;
    const SECONDS = 10;
    const body = (k: string, i: number) => JSON.stringify({ testPointKey: keys[i % keys.length], clientKey: k, text: '4k7' });
    let n = 0;
    const run = (duration: number) =>
      autocannon({
        url: `${url}/api/surveys/${saveId}/readings`,
        method: 'POST',
        connections: CLIENTS,
        duration,
        headers: { 'content-type': 'application/json', authorization: `Bearer ${accessToken}` },
        requests: [{ setupRequest: (req: Record<string, unknown>) => ({ ...req, body: body(clientKey(), n++) }) }],
      } as never) as unknown as Promise<{ requests: { total: number }; duration: number; latency: { p50: number; p99: number }; non2xx: number; errors: number }>;
    progress(`survey: POST /api/surveys/:id/readings at ${CLIENTS} connections for ${SECONDS} s (after 2 s warm-up)`);
    await run(2);
    const api = await run(SECONDS);
    const apiRps = api.requests.total / api.duration;
    progress('survey: capturing the statements of one save, then the same statements in a pg loop');
    const captured = await captureSave(cluster.url, saveId, keys[1], TECH_EMAIL);
    const loop = await pgLoop(cluster.url, captured.statements, captured.key, CLIENTS, SECONDS);
    const bare = pgbench(cluster, CLIENTS, SECONDS);
    emit({
      figure: 'survey.save.latency-p99',
      value: api.latency.p99,
      unit: 'ms',
      stat: 'p99',
      target: 20,
      source: `${SOURCE}: one reading saved at 32 concurrent clients, p99 ≤ 20 ms`,
      p50Ms: api.latency.p50,
      throughput: round(apiRps),
      requests: api.requests.total,
      non2xx: api.non2xx,
      errors: api.errors,
    });
    emit({
      figure: 'survey.save.share-of-pg-loop',
      value: round(loop.rps / apiRps),
      unit: 'pg-loop throughput / API throughput',
      target: 2,
      source: `${SOURCE}: the API at ≥ 50 % of a direct pg loop issuing the same statements (value ≤ 2)`,
      apiThroughput: round(apiRps),
      pgLoopThroughput: round(loop.rps),
      pgLoopP50Ms: round(loop.p50),
      pgLoopP99Ms: round(loop.p99),
      statementsPerSave: captured.statements.length,
      statements: captured.statements.map((s) => s.text.replace(/\s+/g, ' ').slice(0, 160)),
    });
    emit({
      figure: 'survey.save.pgbench-bare-insert',
      value: bare ? round(bare.tps) : -1,
      unit: 'tps',
      target: null,
      latencyAverageMs: bare?.latencyMs ?? null,
      note: bare ? 'pgbench, 32 clients, one single-row INSERT per transaction: the physical limit, for information' : 'pgbench not found beside the PostgreSQL binaries',
    });

    // --- Key press to verdict shown, in Chromium.
    await keyToVerdict(emit, { url, email: TECH_EMAIL, password: DEMO_PASSWORD, surveyId: keyId });
  } finally {
    await stopChild(child);
    if (pool) await pool.end().catch(() => undefined);
    if (cluster) {
      try {
        stopCluster(cluster, 'fast');
      } catch (e) {
        progress(`stopping the cluster: ${(e as Error).message}`);
      }
    }
    for (const d of temp) rmSync(d, { recursive: true, force: true });
  }
}
