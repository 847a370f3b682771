/**
 * Group `library`: the template library search on 10,000 templates (issue 4, "The library": "On
 * 10,000 templates a search answers in ≤ 50 ms p95 with an index scan in EXPLAIN").
 *
 * A throwaway PostgreSQL cluster (port 15441 or the next free one, fsync off), the committed
 * migrations and the demo seed; then 10,000 published templates inserted with SQL in batches —
 * copies of the three demo documents (12 variants: each with other real tube line-ups written
 * into its sockets) under invented makers, models, chassis numbers, kinds, years and 40 invented
 * authors, 90 % public, 5 % shared, 5 % private. The content is built in the database
 * (jsonb_set on the variant), so only the small columns cross the wire.
 *
 * Then the real server in its own process (bench/api-server.ts) answers `GET /api/templates` with
 * a technician's token: each search sent one at a time after a warm-up, p50 and p95 per search
 * and over all of them (target p95 ≤ 50 ms). And `EXPLAIN (FORMAT JSON)` of the very SQL the
 * library repository sends for each search (captured through a Drizzle logger, with its
 * parameters): the plan's node types, and whether chassis_templates is read through an index
 * (Index Scan, Index Only Scan or Bitmap Index Scan) — a figure counting the searches that read it
 * sequentially (target 0). The unfiltered listing's count reads every visible row by nature: it is
 * reported for information.
 */
import { fork, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { drizzle } from 'drizzle-orm/node-postgres';
import pg from 'pg';
import { createDatabase } from '../api/db';
import type { TemplateDocument } from '../api/domain/template-format';
import { listLibrary, type LibraryFilter } from '../api/templates/templates.repository';
import * as schema from '../schema/index';
import { portInUse, startCluster, stopCluster, type Cluster } from '../scripts/cluster';
import { runMigrations } from '../scripts/migrate';
import { demoChassis } from '../seeds/chassis';
import { DEMO_ACCOUNTS, DEMO_PASSWORD, seedDemo } from '../seeds/seed';
import { mulberry32 } from './lib/prng';
import { progress, quantile, round, type Figure } from './lib/stats';
import { stopChild } from './lib/child';

const FIRST_PORT = 15441;
const HERE = new URL('.', import.meta.url).pathname;
export const LIBRARY_TEMPLATES = 10_000;
const BATCH = 1000;
const TARGET_P95_MS = 50;
const SOURCE = 'issue 4, "The library": ≤ 50 ms p95 on 10,000 templates';

// Invented names (fictional makers, models and people); real tube types are trade terms.
const MAKER_HEADS = ['Marrow', 'Vella', 'Quen', 'Halde', 'Brist', 'Corm', 'Dun', 'Ather', 'Fenn', 'Gald', 'Harn', 'Ister', 'Jorv', 'Kell', 'Lumm', 'Morv', 'Nor', 'Orr', 'Pell', 'Rask'];
const MAKER_TAILS = ['field', 'cott', 'by', 'wick', 'stone', 'mere', 'ford', 'ton', 'holm', 'gate'];
const MAKER_KINDS = ['Radio Works', '& Sons', 'Audio', 'Electric'];
const MODEL_WORDS = ['Kestrel', 'Larkspur', 'Wren', 'Heron', 'Finch', 'Merlin', 'Osprey', 'Plover', 'Linnet', 'Curlew', 'Dunlin', 'Siskin', 'Tern', 'Bunting', 'Starling', 'Redpoll', 'Avocet', 'Godwit', 'Whimbrel', 'Sanderling'];
const FIRST_NAMES = ['Ilse', 'Tomas', 'Rhea', 'Oskar', 'Nadia', 'Piet', 'Liv', 'Arno', 'Mira', 'Jonah'];
const LAST_NAMES = ['Vantreek', 'Holloway-Brinn', 'Castellane', 'Mørkvist'];

/** Per demo document (in demoChassis() order): its distinct tube types, the kinds its copies take, and line-ups to write in their place. */
const FAMILIES: { kinds: string[]; lineups: string[][] }[] = [
  {
    // AC/DC five-tube sets
    kinds: ['table-radio', 'portable'],
    lineups: [
      ['35W4', '12BE6', '12BA6', '12AV6', '50C5'],
      ['35Z5GT', '12SA7', '12SK7', '12SQ7', '50L6GT'],
      ['35W4', '12BE6', '12BD6', '12AT6', '35C5'],
      ['36AM3', '12AD6', '12DK6', '12AJ6', '50EH5'],
    ],
  },
  {
    // transformer consoles with push-pull output
    kinds: ['console', 'table-radio', 'communications-receiver'],
    lineups: [
      ['5Y3GT', '6BE6', '6BA6', '6AV6', '6SN7GT', '6V6GT'],
      ['5U4GB', '6SA7', '6SK7', '6SQ7', '6SN7GT', '6L6GC'],
      ['5Y3GT', '6BE6', '6BD6', '6AT6', '12AU7', '6K6GT'],
      ['5AR4', '6BE6', '6BA6', '6AV6', '12AU7', '6AQ5'],
    ],
  },
  {
    // small amplifiers
    kinds: ['amplifier', 'other'],
    lineups: [
      ['EZ81', '12AX7', 'EL84'],
      ['GZ34', '12AT7', '6V6GT'],
      ['EZ80', 'ECC83', 'EL84'],
      ['5AR4', '12AU7', '6BQ5'],
    ],
  },
];

const distinctTubes = (d: TemplateDocument) => [...new Set(d.stages.flatMap((s) => s.sockets.map((so) => so.tubeType)))];

/** The 12 base documents: each demo document with each line-up written into its sockets. */
function variants(): { doc: TemplateDocument; tubeTypes: string[]; family: number }[] {
  const out: { doc: TemplateDocument; tubeTypes: string[]; family: number }[] = [];
  demoChassis().forEach((demo, family) => {
    const from = distinctTubes(demo);
    if (from.length !== FAMILIES[family].lineups[0].length) throw new Error(`line-ups of ${demo.chassis.model} must name ${from.length} tube types (${from.join(', ')})`);
    for (const lineup of FAMILIES[family].lineups) {
      const doc = structuredClone(demo);
      for (const st of doc.stages) for (const so of st.sockets) so.tubeType = lineup[from.indexOf(so.tubeType)];
      out.push({ doc, tubeTypes: [...new Set(lineup)].sort(), family });
    }
  });
  return out;
}

interface Row {
  maker: string;
  model: string;
  chassisNumber: string;
  kind: string;
  variant: number;
  owner: number;
  surveys: number;
  year: number;
  visibility: 'public' | 'shared' | 'private';
}

function rows(n: number, authorIds: number[], variantFamilies: number[]): Row[] {
  const rnd = mulberry32(20260412);
  const pick = <T>(xs: readonly T[]): T => xs[Math.floor(rnd() * xs.length)];
  const out: Row[] = [];
  for (let i = 0; i < n; i++) {
    const variant = Math.floor(rnd() * variantFamilies.length);
    const family = FAMILIES[variantFamilies[variant]];
    const head = pick(MAKER_HEADS);
    const r = rnd();
    out.push({
      maker: `${head}${pick(MAKER_TAILS)} ${pick(MAKER_KINDS)}`,
      model: `${pick(MODEL_WORDS)} ${1 + Math.floor(rnd() * 12)}${rnd() < 0.3 ? '-P' : ''}`,
      chassisNumber: `${head.slice(0, 2).toUpperCase()}-${String(i).padStart(5, '0')}`,
      kind: pick(family.kinds),
      variant,
      owner: pick(authorIds),
      // a few much-used templates, most little used
      surveys: Math.floor(rnd() ** 3 * 400),
      year: 1930 + Math.floor(rnd() * 35),
      visibility: r < 0.9 ? 'public' : r < 0.95 ? 'shared' : 'private',
    });
  }
  return out;
}

/** 40 invented authors, the demo's password hash (nobody signs in as them). */
async function insertAuthors(pool: pg.Pool): Promise<number[]> {
  const names = FIRST_NAMES.flatMap((f) => LAST_NAMES.map((l) => `${f} ${l}`));
  const res = await pool.query<{ id: number }>(
    `INSERT INTO users (email, name, roles, password_hash)
     SELECT 'bench-author-' || i || '@driftmark.example', n, ARRAY['author']::role[], (SELECT password_hash FROM users WHERE email = $2)
     FROM unnest($1::text[]) WITH ORDINALITY AS x(n, i) RETURNING id`,
    [names, DEMO_ACCOUNTS.find((a) => a.roles.includes('author'))!.email],
  );
  return res.rows.map((r) => r.id);
}

export async function insertLibrary(pool: pg.Pool, n: number): Promise<{ seconds: number; templates: number }> {
  const t0 = performance.now();
  const vs = variants();
  // A temp table lives in one session: take one client for the whole insert.
  const client = await pool.connect();
  try {
    await client.query('CREATE TEMP TABLE bench_variants (i int PRIMARY KEY, doc jsonb, tube_types text[], stages int, test_points int, components int)');
    for (const [i, v] of vs.entries()) {
      await client.query('INSERT INTO bench_variants VALUES ($1, $2, $3, $4, $5, $6)', [i, JSON.stringify(v.doc), v.tubeTypes, v.doc.stages.length, v.doc.testPoints.length, v.doc.components.length]);
    }
    const authors = await insertAuthors(pool);
    const all = rows(n, authors, vs.map((v) => v.family));
    for (let start = 0; start < all.length; start += BATCH) {
      const b = all.slice(start, start + BATCH);
      const col = <K extends keyof Row>(k: K) => b.map((r) => r[k]);
      await client.query(
        `WITH r AS (
           SELECT * FROM unnest($1::text[], $2::text[], $3::text[], $4::chassis_kind[], $5::int[], $6::int[], $7::int[], $8::int[], $9::template_visibility[])
             AS r(maker, model, chassis_number, kind, variant, owner_id, surveys, year, visibility)
         ), t AS (
           INSERT INTO chassis_templates (owner_id, maker, model, chassis_number, kind, power, year_from, year_to, visibility, revision,
             search_text, tube_types, stage_count, test_point_count, component_count, latest_published_number, version_count, survey_count)
           SELECT r.owner_id, r.maker, r.model, r.chassis_number, r.kind, (v.doc->'chassis'->>'power')::power_arrangement, r.year, r.year + 2, r.visibility, 2,
             lower(concat_ws(' ', r.maker, r.model, r.chassis_number, array_to_string(v.tube_types, ' '), u.name)),
             v.tube_types, v.stages, v.test_points, v.components, 1, 1, r.surveys
           FROM r JOIN bench_variants v ON v.i = r.variant JOIN users u ON u.id = r.owner_id
           RETURNING id, chassis_number, owner_id
         )
         INSERT INTO template_versions (template_id, state, number, content, revision, changelog, published_at, published_by, tube_types, stage_count, test_point_count, component_count)
         SELECT t.id, 'published', 1,
           jsonb_set(v.doc, '{chassis}', (v.doc->'chassis') || jsonb_build_object('maker', r.maker, 'model', r.model, 'chassisNumber', r.chassis_number, 'kind', r.kind, 'yearFrom', r.year, 'yearTo', r.year + 2, 'variants', '[]'::jsonb)),
           2, 'First issue', now(), t.owner_id, v.tube_types, v.stages, v.test_points, v.components
         FROM t JOIN r ON r.chassis_number = t.chassis_number JOIN bench_variants v ON v.i = r.variant`,
        [col('maker'), col('model'), col('chassisNumber'), col('kind'), col('variant'), col('owner'), col('surveys'), col('year'), col('visibility')],
      );
    }
    // Shared templates are shared with the demo technician (the searching caller) for half of them.
    await client.query(
      `INSERT INTO template_shares (template_id, user_id)
       SELECT t.id, (SELECT id FROM users WHERE email = $1) FROM chassis_templates t WHERE t.visibility = 'shared' AND t.id % 2 = 0`,
      [DEMO_ACCOUNTS.find((a) => a.roles.includes('technician') && a.roles.length === 1)!.email],
    );
    await client.query('ANALYZE');
  } finally {
    client.release();
  }
  const { rows: c } = await pool.query<{ n: string }>('SELECT count(*) AS n FROM chassis_templates');
  return { seconds: (performance.now() - t0) / 1000, templates: Number(c[0].n) };
}

/** The searches: a name and the query string; `filter` is the same search as the repository takes it. */
function searches(maker: string, model: string, author: string): { name: string; query: string; filter: Omit<LibraryFilter, 'viewerId' | 'all'> }[] {
  const base = { sort: 'use' as const, page: 1, pageSize: 25 };
  const makerWord = maker.split(' ')[0].toLowerCase();
  const modelWord = model.split(' ')[0].toLowerCase();
  const list: { name: string; filter: Omit<LibraryFilter, 'viewerId' | 'all'> }[] = [
    { name: 'q=maker', filter: { ...base, q: makerWord } },
    { name: 'q=model+number', filter: { ...base, q: model.toLowerCase() } },
    { name: 'q=tube-type', filter: { ...base, q: '6l6gc' } },
    { name: 'q=author', filter: { ...base, q: author.split(' ')[1].toLowerCase() } },
    { name: 'q=no-match', filter: { ...base, q: 'zzqx' } },
    { name: 'tubeType=6L6GC', filter: { ...base, tubeType: '6L6GC' } },
    { name: 'maker+kind', filter: { ...base, maker: makerWord, kind: 'console' } },
    { name: 'model,sort=maker,page=2', filter: { ...base, model: modelWord, sort: 'maker', page: 2 } },
    { name: 'chassis', filter: { ...base, chassis: 'MO-0' } },
    { name: 'author,sort=updated', filter: { ...base, author: author.split(' ')[1], sort: 'updated' } },
    { name: 'q+tubeType', filter: { ...base, q: modelWord, tubeType: 'EL84' } },
  ];
  return list.map((s) => {
    const p = new URLSearchParams();
    for (const [k, v] of Object.entries(s.filter)) if (v !== undefined) p.set(k, String(v));
    return { ...s, query: p.toString() };
  });
}

/** The plain listing (no filter, sorted by use): its count reads every visible row by nature. */
const LISTING = { name: 'listing (no filter)', query: 'sort=use&page=1&pageSize=25', filter: { sort: 'use' as const, page: 1, pageSize: 25 } };

interface PlanSummary {
  nodeTypes: string[];
  /** Node types that read chassis_templates, with the index used. */
  templateAccess: string[];
  /** chassis_templates is read through an index (Index Scan, Index Only Scan, or a Bitmap Index Scan feeding its Bitmap Heap Scan) and never sequentially. */
  indexOnTemplates: boolean;
}

function walkPlan(node: Record<string, unknown>, out: { types: string[]; access: string[] }): void {
  const type = String(node['Node Type']);
  out.types.push(type);
  const rel = node['Relation Name'];
  const idx = node['Index Name'];
  if (rel === 'chassis_templates' || (typeof idx === 'string' && idx.startsWith('chassis_templates'))) out.access.push(idx ? `${type} (${String(idx)})` : type);
  for (const child of (node['Plans'] as Record<string, unknown>[] | undefined) ?? []) walkPlan(child, out);
}

/** EXPLAIN (FORMAT JSON) of each SQL statement the repository sends for one search. */
async function explainSearch(pool: pg.Pool, viewerId: number, filter: Omit<LibraryFilter, 'viewerId' | 'all'>): Promise<{ statement: 'items' | 'count'; plan: PlanSummary; sql: string; executionMs: number }[]> {
  const captured: { sql: string; params: unknown[] }[] = [];
  const logging = drizzle(pool, { schema, casing: 'snake_case', logger: { logQuery: (q, p) => void captured.push({ sql: q, params: p }) } });
  await listLibrary(logging, { ...filter, viewerId, all: false });
  const out: { statement: 'items' | 'count'; plan: PlanSummary; sql: string; executionMs: number }[] = [];
  for (const c of captured) {
    const r = await pool.query<{ 'QUERY PLAN': [{ Plan: Record<string, unknown> }] }>(`EXPLAIN (FORMAT JSON) ${c.sql}`, c.params);
    const acc = { types: [] as string[], access: [] as string[] };
    walkPlan(r.rows[0]['QUERY PLAN'][0].Plan, acc);
    // The statement's own time in the server (a diagnostic beside the request latency): best of 5 EXPLAIN ANALYZE runs.
    let executionMs = Infinity;
    for (let k = 0; k < 5; k++) {
      const a = await pool.query<{ 'QUERY PLAN': [{ 'Execution Time': number; 'Planning Time': number }] }>(`EXPLAIN (ANALYZE, FORMAT JSON) ${c.sql}`, c.params);
      executionMs = Math.min(executionMs, a.rows[0]['QUERY PLAN'][0]['Execution Time'] + a.rows[0]['QUERY PLAN'][0]['Planning Time']);
    }
    out.push({
      statement: /count\(/i.test(c.sql) ? 'count' : 'items',
      executionMs: round(executionMs),
      sql: c.sql,
      plan: { nodeTypes: [...new Set(acc.types)], templateAccess: acc.access, indexOnTemplates: acc.access.some((a) => /Index/.test(a)) && !acc.access.includes('Seq Scan') },
    });
  }
  return out;
}

async function timeSearch(url: string, token: string, query: string, n: number): Promise<{ samples: number[]; status: Record<string, number>; total: number | null }> {
  const samples: number[] = [];
  const status: Record<string, number> = {};
  let total: number | null = null;
  for (let i = 0; i < n; i++) {
    const t0 = performance.now();
    const res = await fetch(`${url}/api/templates?${query}`, { headers: { authorization: `Bearer ${token}` } });
    const body = (await res.json()) as { total?: number };
    samples.push(performance.now() - t0);
    status[res.status] = (status[res.status] ?? 0) + 1;
    if (res.status === 200 && typeof body.total === 'number') total = body.total;
  }
  return { samples, status, total };
}

async function timeSearchPath(url: string, token: string, path: string, n: number): Promise<number[]> {
  const samples: number[] = [];
  for (let i = 0; i < n; i++) {
    const t0 = performance.now();
    const res = await fetch(url + path, { headers: { authorization: `Bearer ${token}` } });
    await res.arrayBuffer();
    samples.push(performance.now() - t0);
  }
  return samples;
}

export async function runLibrary(emit: (f: Figure) => void): Promise<void> {
  const temp: string[] = [];
  let cluster: Cluster | null = null;
  let child: ChildProcess | null = null;
  let database: ReturnType<typeof createDatabase> | null = null;
  let cleaned = false;
  const cleanup = async (): Promise<void> => {
    if (cleaned) return;
    cleaned = true;
    if (database) await database.close().catch(() => undefined);
    await stopChild(child);
    if (cluster) {
      try {
        stopCluster(cluster, 'fast');
      } catch (e) {
        progress(`stopping the cluster: ${(e as Error).message}`);
      }
    }
    for (const d of temp) rmSync(d, { recursive: true, force: true });
    progress('library: server and cluster stopped; temporary folders removed');
  };
  const onSignal = () => void cleanup().then(() => process.exit(130));
  process.once('SIGINT', onSignal);
  process.once('SIGTERM', onSignal);
  const mk = (tag: string) => {
    const d = mkdtempSync(join(tmpdir(), `driftmark-bench-${tag}-`));
    temp.push(d);
    return d;
  };
  try {
    let port = FIRST_PORT;
    while (await portInUse(port)) port++;
    cluster = await startCluster({ dataDir: mk('library-pg'), port, throwaway: true, log: progress });
    await runMigrations(cluster.url);
    database = createDatabase(cluster.url, { max: 4 });
    await seedDemo(database.db, { NODE_ENV: 'development' });
    progress(`library: inserting ${LIBRARY_TEMPLATES} templates in batches of ${BATCH}`);
    const inserted = await insertLibrary(database.pool, LIBRARY_TEMPLATES);
    emit({ figure: 'library.insert', value: round(inserted.seconds), unit: 's', target: null, templates: inserted.templates, batch: BATCH, note: 'SQL inserts of templates and their published versions, content built in the database; ANALYZE included' });

    child = fork(join(HERE, 'api-server.ts'), [], {
      execArgv: ['--import', 'tsx'],
      env: { ...process.env, BENCH_DATABASE_URL: cluster.url, BENCH_JWT_SECRET: randomBytes(36).toString('base64url'), BENCH_APP_DATA_DIR: mk('library-data'), BENCH_APP_DIST_DIR: mk('library-dist') },
      stdio: ['ignore', 'ignore', 'inherit', 'ipc'],
    });
    const c = child;
    const url = await new Promise<string>((resolve, reject) => {
      c.once('message', (m) => resolve((m as { url: string }).url));
      c.once('exit', (code) => reject(new Error(`the bench server exited (code ${code}) before listening`)));
    });
    const tech = DEMO_ACCOUNTS.find((a) => a.roles.includes('technician') && a.roles.length === 1)!;
    const signIn = await fetch(`${url}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: tech.email, password: DEMO_PASSWORD }) });
    if (signIn.status !== 200) throw new Error(`sign-in as ${tech.email} answered ${signIn.status}`);
    const { accessToken } = (await signIn.json()) as { accessToken: string };
    const { rows: viewer } = await database.pool.query<{ id: number }>('SELECT id FROM users WHERE email = $1', [tech.email]);
    const { rows: sample } = await database.pool.query<{ maker: string; model: string; name: string }>(
      `SELECT t.maker, t.model, u.name FROM chassis_templates t JOIN users u ON u.id = t.owner_id WHERE t.visibility = 'public' ORDER BY t.id OFFSET 4321 LIMIT 1`,
    );
    const list = searches(sample[0].maker, sample[0].model, sample[0].name);

    progress(`library: ${list.length} searches, 20 warm-up and 100 timed requests each, one at a time`);
    const all: number[] = [];
    const perSearch: Record<string, unknown>[] = [];
    for (const s of [...list, LISTING]) {
      await timeSearch(url, accessToken, s.query, 20);
      const r = await timeSearch(url, accessToken, s.query, 100);
      const sorted = [...r.samples].sort((a, b) => a - b);
      if (s !== LISTING) all.push(...r.samples);
      perSearch.push({ search: s.name, query: s.query, total: r.total, p50Ms: round(quantile(sorted, 0.5)), p95Ms: round(quantile(sorted, 0.95)), status: r.status });
      emit({ figure: `library.search.${s.name}`, value: round(quantile(sorted, 0.95)), unit: 'ms', stat: 'p95', target: null, p50Ms: round(quantile(sorted, 0.5)), total: r.total, query: s.query, statusCodes: r.status });
    }
    // The floor under every signed-in request (token check and one user query), same loop: a diagnostic beside the searches.
    await timeSearchPath(url, accessToken, '/api/me', 20);
    const me = (await timeSearchPath(url, accessToken, '/api/me', 100)).sort((a, b) => a - b);
    emit({ figure: 'library.baseline.me', value: round(quantile(me, 0.95)), unit: 'ms', stat: 'p95', target: null, p50Ms: round(quantile(me, 0.5)), note: 'GET /api/me in the same loop: what a signed-in request costs without a search' });
    all.sort((a, b) => a - b);
    const non200 = perSearch.reduce((n, s) => n + Object.entries(s['status'] as Record<string, number>).reduce((m, [code, k]) => m + (code === '200' ? 0 : k), 0), 0);
    emit({
      figure: 'library.search.latency-p95',
      value: round(quantile(all, 0.95)),
      unit: 'ms',
      stat: 'p95',
      target: TARGET_P95_MS,
      source: SOURCE,
      p50Ms: round(quantile(all, 0.5)),
      requests: all.length,
      non200,
      templates: inserted.templates,
      route: 'GET /api/templates (technician token; sequential requests, each search 100 times after 20 warm-up)',
    });

    progress('library: EXPLAIN (FORMAT JSON) of the SQL each search sends');
    let sequential = 0;
    const plans: Record<string, unknown>[] = [];
    for (const s of list) {
      const explained = await explainSearch(database.pool, viewer[0].id, s.filter);
      const indexed = explained.every((e) => e.plan.indexOnTemplates);
      if (!indexed) sequential++;
      plans.push({ search: s.name, indexed, statements: explained.map((e) => ({ statement: e.statement, executionMs: e.executionMs, nodeTypes: e.plan.nodeTypes, chassisTemplates: e.plan.templateAccess })) });
    }
    const listingPlan = await explainSearch(database.pool, viewer[0].id, LISTING.filter);
    emit({
      figure: 'library.explain.searches-without-index-scan',
      value: sequential,
      unit: 'searches',
      target: 0,
      source: `${SOURCE}, "with an index scan in EXPLAIN"`,
      verdict: sequential === 0 ? 'PASS: every search reads chassis_templates through an index or bitmap index scan' : 'FAIL: some search reads chassis_templates sequentially',
      plans,
    });
    emit({
      figure: 'library.explain.listing',
      value: listingPlan.every((e) => e.plan.indexOnTemplates) ? 0 : 1,
      unit: 'statements without an index scan',
      target: null,
      note: 'the unfiltered listing: the page comes from the use index; its count reads every visible row by nature (information)',
      statements: listingPlan.map((e) => ({ statement: e.statement, executionMs: e.executionMs, nodeTypes: e.plan.nodeTypes, chassisTemplates: e.plan.templateAccess })),
    });
  } finally {
    await cleanup();
    process.removeListener('SIGINT', onSignal);
    process.removeListener('SIGTERM', onSignal);
  }
}
