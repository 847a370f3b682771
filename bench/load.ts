/**
 * Group `load` (issue #7, "Load"): the cached scaled database of the survey group (200 sets,
 * 2,000 surveys, 500,000+ readings), the real server in its own process, and virtual users at 32
 * and then 128 concurrent clients for 30 s each on a mixed workload — open a survey, save a
 * reading, list templates, open a set's history. Each virtual user signs in once (sign-in is its
 * own line) and then loops: pick a route by weight, send it, wait for the answer, go again
 * (a closed loop, no think time). Per route: requests per second, p50 and p99, errors (any answer
 * that is not the expected 2xx, and network errors); the server's memory (RSS, heap) sampled every
 * second; and EXPLAIN (FORMAT JSON) of the five statements PostgreSQL spent the most time on
 * during the run (from its own statement log, parameters included), with whether each reads the
 * large tables (readings, surveys, sets) through an index.
 */
import { fork, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import pg from 'pg';
import { stopCluster, type Cluster } from '../scripts/cluster';
import { DEMO_PASSWORD } from '../seeds/seed';
import { stopChild } from './lib/child';
import { progress, quantile, round, type Figure } from './lib/stats';
import { benchChassis, scaledDatabase } from './survey';

const HERE = new URL('.', import.meta.url).pathname;
const SECONDS = Number(process.env.BENCH_LOAD_SECONDS || 30);
const SOURCE = 'issue 7, "Load"';

type Route = 'open-survey' | 'save-reading' | 'list-templates' | 'open-history';
/** How often each route is picked: a technician at the bench mostly keys readings. */
const WEIGHTS: [Route, number][] = [
  ['save-reading', 6],
  ['open-survey', 2],
  ['list-templates', 1],
  ['open-history', 1],
];

interface VirtualUser {
  token: string;
  surveyId: number;
  setId: number;
}

interface Sample {
  route: Route;
  ms: number;
  ok: boolean;
}

function pickRoute(r: number): Route {
  const total = WEIGHTS.reduce((n, [, w]) => n + w, 0);
  let x = r * total;
  for (const [route, w] of WEIGHTS) {
    if (x < w) return route;
    x -= w;
  }
  return WEIGHTS[0][0];
}

async function signIn(url: string, email: string): Promise<{ token: string; ms: number }> {
  const t0 = performance.now();
  const r = await fetch(`${url}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password: DEMO_PASSWORD }) });
  const ms = performance.now() - t0;
  if (r.status !== 200) throw new Error(`sign-in of ${email} answered ${r.status}: ${(await r.text()).slice(0, 200)}`);
  return { token: ((await r.json()) as { accessToken: string }).accessToken, ms };
}

async function run(url: string, users: VirtualUser[], seconds: number, keys: string[]): Promise<Sample[]> {
  const samples: Sample[] = [];
  const until = performance.now() + seconds * 1000;
  let seq = 0;
  const loop = async (u: VirtualUser, i: number) => {
    let rnd = (i * 2654435761) >>> 0;
    while (performance.now() < until) {
      rnd = (Math.imul(rnd, 1664525) + 1013904223) >>> 0;
      const route = pickRoute(rnd / 0x100000000);
      const auth = { authorization: `Bearer ${u.token}` };
      const t0 = performance.now();
      let ok = false;
      try {
        let r: Response;
        if (route === 'save-reading') {
          const body = JSON.stringify({ testPointKey: keys[seq++ % keys.length], clientKey: randomBytes(12).toString('base64url'), text: '4k7' });
          r = await fetch(`${url}/api/surveys/${u.surveyId}/readings`, { method: 'POST', headers: { ...auth, 'content-type': 'application/json' }, body });
          ok = r.status === 201;
        } else if (route === 'open-survey') {
          r = await fetch(`${url}/api/surveys/${u.surveyId}`, { headers: auth });
          ok = r.status === 200;
        } else if (route === 'list-templates') {
          r = await fetch(`${url}/api/templates?sort=updated&pageSize=20`, { headers: auth });
          ok = r.status === 200;
        } else {
          r = await fetch(`${url}/api/sets/${u.setId}/history`, { headers: auth });
          ok = r.status === 200;
        }
        await r.arrayBuffer();
      } catch {
        ok = false;
      }
      samples.push({ route, ms: performance.now() - t0, ok });
    }
  };
  await Promise.all(users.map((u, i) => loop(u, i)));
  return samples;
}

/** The statements PostgreSQL logged during the run (log_min_duration_statement = 0), by total time. */
function heaviestStatements(logFile: string, from: number): { text: string; params: string[]; totalMs: number; calls: number }[] {
  const text = readFileSync(logFile, 'utf8').slice(from);
  const lines = text.split('\n');
  const byText = new Map<string, { text: string; params: string[]; totalMs: number; calls: number }>();
  for (let i = 0; i < lines.length; i++) {
    // The execute step of the extended protocol, or a simple-protocol statement (parse and bind steps are left out).
    const m = /duration: ([\d.]+) ms\s+(?:execute [^:]*|statement): (.*)$/.exec(lines[i]);
    if (!m) continue;
    let sql = m[2];
    // Continuation lines of a multi-line statement start with a tab.
    let j = i + 1;
    while (j < lines.length && lines[j].startsWith('\t')) sql += '\n' + lines[j++].slice(1);
    let params: string[] = [];
    if (j < lines.length && /DETAIL:\s+parameters: /.test(lines[j])) {
      const p = lines[j].replace(/.*DETAIL:\s+parameters: /, '');
      params = [...p.matchAll(/\$\d+ = (NULL|'(?:[^']|'')*')/g)].map((x) => x[1]);
    }
    if (/^(BEGIN|COMMIT|ROLLBACK|SET |SHOW |SELECT 1$)/i.test(sql.trim())) continue;
    const key = sql.replace(/\s+/g, ' ').trim();
    const e = byText.get(key) ?? { text: sql, params, totalMs: 0, calls: 0 };
    e.totalMs += Number(m[1]);
    e.calls++;
    byText.set(key, e);
  }
  return [...byText.values()].sort((a, b) => b.totalMs - a.totalMs).slice(0, 5);
}

interface PlanNode {
  'Node Type': string;
  'Relation Name'?: string;
  Plans?: PlanNode[];
}
function walk(n: PlanNode, out: { type: string; relation?: string }[]): void {
  out.push({ type: n['Node Type'], relation: n['Relation Name'] });
  for (const c of n.Plans ?? []) walk(c, out);
}

export async function runLoad(emit: (f: Figure) => void, opts: { freshScaled?: boolean } = {}): Promise<void> {
  const temp: string[] = [];
  let cluster: Cluster | null = null;
  let child: ChildProcess | null = null;
  let pool: pg.Pool | null = null;
  try {
    const scaled = await scaledDatabase(opts.freshScaled === true);
    cluster = scaled.cluster;
    pool = new pg.Pool({ connectionString: cluster.url, max: 4 });
    const { rows: counts } = await pool.query<{ readings: string; surveys: string; sets: string }>('SELECT (SELECT count(*) FROM readings) readings, (SELECT count(*) FROM surveys) surveys, (SELECT count(*) FROM sets) sets');
    const keys = benchChassis().testPoints.map((p) => p.key);
    const { rows: techs } = await pool.query<{ id: number; email: string }>(
      "SELECT id, email FROM users WHERE email = 'tech@driftmark.example' OR email LIKE 'bench-tech-%@bench.example' ORDER BY id",
    );

    const mk = (tag: string) => {
      const d = mkdtempSync(join(tmpdir(), `driftmark-bench-${tag}-`));
      temp.push(d);
      return d;
    };
    child = fork(join(HERE, 'api-server.ts'), [], {
      execArgv: ['--import', 'tsx'],
      env: { ...process.env, BENCH_DATABASE_URL: cluster.url, BENCH_JWT_SECRET: randomBytes(36).toString('base64url'), BENCH_APP_DATA_DIR: mk('load-data'), BENCH_APP_DIST_DIR: mk('load-dist') },
      stdio: ['ignore', 'ignore', 'inherit', 'ipc'],
    });
    const c = child;
    const url = await new Promise<string>((resolve, reject) => {
      c.once('message', (m) => resolve((m as { url: string }).url));
      c.once('exit', (code) => reject(new Error(`the bench server exited (code ${code}) before listening`)));
    });
    const memory: { rss: number; heapUsed: number }[] = [];
    c.on('message', (m) => {
      const mem = (m as { memory?: { rss: number; heapUsed: number } }).memory;
      if (mem) memory.push(mem);
    });

    for (const clients of [32, 128]) {
      // Each virtual user: one of the technicians (in turn), a draft survey of its own on one of that technician's bench sets.
      progress(`load: ${clients} virtual users sign in once, each with a draft survey of its own`);
      const users: VirtualUser[] = [];
      const signIns: number[] = [];
      for (let i = 0; i < clients; i++) {
        const t = techs[i % techs.length];
        const { rows: set } = await pool.query<{ id: number; version_id: number }>(
          `SELECT s.id, v.id version_id FROM sets s JOIN template_versions v ON v.template_id = s.template_id AND v.number = 1
           WHERE s.owner_id = $1 AND s.label LIKE 'Bench set %' ORDER BY s.id OFFSET $2 LIMIT 1`,
          [t.id, Math.floor(i / techs.length) % 10],
        );
        const { rows: sv } = await pool.query<{ id: number }>(
          `INSERT INTO surveys (set_id, template_version_id, version_number, purpose, state, meter, rule, conditions, started_by)
           SELECT set_id, template_version_id, 1, 'periodic', 'draft', meter, rule, conditions, $2 FROM surveys WHERE set_id = $1 ORDER BY id LIMIT 1 RETURNING id`,
          [set[0].id, t.id],
        );
        const s = await signIn(url, t.email);
        signIns.push(s.ms);
        users.push({ token: s.token, surveyId: sv[0].id, setId: set[0].id });
      }
      signIns.sort((a, b) => a - b);
      emit({ figure: `load.${clients}.sign-in`, value: round(quantile(signIns, 0.99)), unit: 'ms', stat: 'p99', target: null, p50Ms: round(quantile(signIns, 0.5)), signIns: signIns.length, note: 'each virtual user signs in once, one after the other (bcrypt cost of the instance)' });

      progress(`load: ${clients} virtual users, mixed workload for ${SECONDS} s (5 s warm-up first)`);
      await run(url, users, 5, keys);
      const logFile = cluster.logFile;
      await pool.query('ALTER SYSTEM SET log_min_duration_statement = 0');
      await pool.query('SELECT pg_reload_conf()');
      const logFrom = statSync(logFile).size;
      const sampler = setInterval(() => c.connected && c.send('memory'), 1000);
      const t0 = performance.now();
      const samples = await run(url, users, SECONDS, keys);
      const seconds = (performance.now() - t0) / 1000;
      clearInterval(sampler);
      await pool.query('ALTER SYSTEM RESET log_min_duration_statement');
      await pool.query('SELECT pg_reload_conf()');

      const errors = samples.filter((s) => !s.ok).length;
      emit({
        figure: `load.${clients}.throughput`,
        value: round(samples.length / seconds),
        unit: 'req/s',
        target: null,
        requests: samples.length,
        seconds: round(seconds),
        weights: Object.fromEntries(WEIGHTS),
        databaseReadings: Number(counts[0].readings),
        databaseSurveys: Number(counts[0].surveys),
        databaseSets: Number(counts[0].sets),
      });
      emit({ figure: `load.${clients}.errors`, value: errors, unit: 'requests', target: 0, source: `${SOURCE}: errors (0)` });
      for (const [route] of WEIGHTS) {
        const mine = samples.filter((s) => s.route === route);
        const ms = mine.map((s) => s.ms).sort((a, b) => a - b);
        emit({
          figure: `load.${clients}.${route}`,
          value: round(quantile(ms, 0.99)),
          unit: 'ms',
          stat: 'p99',
          target: null,
          p50Ms: round(quantile(ms, 0.5)),
          rps: round(mine.length / seconds),
          requests: mine.length,
          errors: mine.filter((s) => !s.ok).length,
        });
      }
      const rss = memory.map((m) => m.rss);
      emit({
        figure: `load.${clients}.api-memory-rss`,
        value: rss.length ? round(Math.max(...rss) / 2 ** 20) : -1,
        unit: 'MiB',
        stat: 'max',
        target: null,
        heapUsedMaxMiB: memory.length ? round(Math.max(...memory.map((m) => m.heapUsed)) / 2 ** 20) : null,
        samples: rss.length,
      });
      memory.length = 0;

      // EXPLAIN of the five statements with the most total time in this run.
      const heavy = heaviestStatements(logFile, logFrom);
      const plans: Record<string, unknown>[] = [];
      let withoutIndex = 0;
      for (const h of heavy) {
        const sql = h.text.replace(/\$(\d+)/g, (_m, n: string) => h.params[Number(n) - 1] ?? 'NULL');
        let nodes: { type: string; relation?: string }[] = [];
        try {
          await pool.query('BEGIN');
          const ex = await pool.query<{ 'QUERY PLAN': [{ Plan: PlanNode }] }>(`EXPLAIN (FORMAT JSON) ${sql}`);
          walk(ex.rows[0]['QUERY PLAN'][0].Plan, nodes);
        } catch (e) {
          nodes = [{ type: `EXPLAIN failed: ${(e as Error).message.slice(0, 120)}` }];
        } finally {
          await pool.query('ROLLBACK').catch(() => undefined);
        }
        const big = nodes.filter((n) => n.relation === 'readings' || n.relation === 'surveys' || n.relation === 'sets');
        const seq = big.filter((n) => n.type === 'Seq Scan');
        // The sets table is small (203 rows): a sequential read of it is the planner's right choice.
        const bad = seq.filter((n) => n.relation !== 'sets');
        if (bad.length) withoutIndex++;
        plans.push({
          statement: h.text.replace(/\s+/g, ' ').slice(0, 200),
          totalMs: round(h.totalMs),
          calls: h.calls,
          meanMs: round(h.totalMs / h.calls),
          largeTableAccess: big.map((n) => `${n.type} on ${n.relation}`),
          nodeTypes: [...new Set(nodes.map((n) => n.type))],
        });
      }
      emit({
        figure: `load.${clients}.explain.heaviest-without-index`,
        value: withoutIndex,
        unit: 'statements',
        target: 0,
        source: `${SOURCE}: EXPLAIN of the five heaviest queries shows index use`,
        note: 'the five statements with the most total time in the run, from the server log (log_min_duration_statement = 0); a Seq Scan on readings or surveys counts (sets has 203 rows)',
        plans,
      });
    }
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
