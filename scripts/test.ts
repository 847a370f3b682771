/**
 * `npm test`: every suite, one after another (2 cores), on a throwaway PostgreSQL cluster and
 * Debian's Chromium (both installed when missing), ending with one plain line totalling them all:
 * `N passed, N failed`. `npm test -- api` (or domain, karma, e2e) runs one part.
 *
 * Suites: types (tsc on every TypeScript project: one check each) · domain (jasmine, pure computation) · api (jasmine + supertest on PostgreSQL) ·
 * karma (component specs in Chromium) · e2e (jasmine + playwright-core in Chromium against the
 * built app and a real server).
 */
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { buildApp } from './app-build';
import { ensurePostgresInstalled, isRoot, portInUse, PROJECT_ROOT, recreateDatabase, startCluster, stopCluster, type Cluster } from './cluster';
import { runMigrations } from './migrate';

const ALL = ['types', 'domain', 'api', 'karma', 'e2e'] as const;
type Part = (typeof ALL)[number];
const say = (s: string) => console.log(`\n[test] ${s}`);

export const CHROMIUM = '/usr/bin/chromium';

export function ensureChromium(): void {
  if (existsSync(CHROMIUM)) return;
  if (!isRoot()) throw new Error(`Chromium is missing at ${CHROMIUM}: install Debian's package (sudo apt-get install -y chromium).`);
  say('Installing Debian\'s chromium package (apt-get)…');
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  spawnSync('apt-get', ['update', '-qq'], { stdio: 'inherit', env });
  const r = spawnSync('apt-get', ['install', '-y', '-qq', 'chromium'], { stdio: 'inherit', env });
  if (r.status !== 0 || !existsSync(CHROMIUM)) throw new Error('Installing chromium with apt-get failed.');
}

function runLogged(cmd: string, args: string[], env: NodeJS.ProcessEnv): Promise<{ code: number; output: string }> {
  return new Promise((resolve) => {
    const child = spawn(cmd, args, { cwd: PROJECT_ROOT, env, stdio: ['ignore', 'pipe', 'pipe'] });
    let output = '';
    const take = (chunk: Buffer, out: NodeJS.WriteStream) => {
      output += chunk.toString();
      out.write(chunk);
    };
    child.stdout.on('data', (c: Buffer) => take(c, process.stdout));
    child.stderr.on('data', (c: Buffer) => take(c, process.stderr));
    child.on('close', (code) => resolve({ code: code ?? 1, output }));
  });
}

interface Counts {
  suite: string;
  passed: number;
  failed: number;
  skipped: number;
}

async function main(): Promise<void> {
  const asked = process.argv.slice(2).filter((a) => (ALL as readonly string[]).includes(a)) as Part[];
  const parts: Part[] = asked.length ? asked : [...ALL];
  const countsFile = join(tmpdir(), `driftmark-test-counts-${process.pid}.jsonl`);
  rmSync(countsFile, { force: true });
  const results: Counts[] = [];
  const env: NodeJS.ProcessEnv = { ...process.env, NODE_ENV: 'test', DRIFTMARK_COUNTS_FILE: countsFile, CHROME_BIN: CHROMIUM, NG_CLI_ANALYTICS: 'false' };

  let cluster: Cluster | null = null;
  let testDataDir: string | null = null;
  const needsDb = parts.includes('api') || parts.includes('e2e');
  const needsChromium = parts.includes('karma') || parts.includes('e2e');
  try {
    if (needsDb) ensurePostgresInstalled((s) => say(s));
    if (needsChromium) ensureChromium();
    if (needsDb) {
      // A throwaway cluster of this run's own (fsync off): test data only, never a user's. Its own
      // folder and the first free port from DRIFTMARK_TEST_PG_PORT, so two runs never share one.
      testDataDir = mkdtempSync(join(tmpdir(), 'driftmark-test-'));
      let port = Number(process.env.DRIFTMARK_TEST_PG_PORT || 15433);
      while (await portInUse(port)) port++;
      cluster = await startCluster({ dataDir: testDataDir, port, throwaway: true, log: (s) => say(s) });
      const dataDir = testDataDir;
      env.DRIFTMARK_TEST_CLUSTER_URL = cluster.url;
      env.DRIFTMARK_TEST_DATA_DIR = dataDir;
    }

    const jasmineSuite = async (suite: string, config: string, extraEnv: NodeJS.ProcessEnv = {}) => {
      say(`Suite ${suite}`);
      const r = await runLogged(process.execPath, ['--import', 'tsx', 'scripts/run-jasmine.ts', config], { ...env, ...extraEnv, DRIFTMARK_SUITE: suite });
      const lines = existsSync(countsFile) ? readFileSync(countsFile, 'utf8').trim().split('\n').filter(Boolean) : [];
      const mine = lines.map((l) => JSON.parse(l) as Counts).filter((c) => c.suite === suite);
      if (mine.length) results.push(mine[mine.length - 1]);
      else results.push({ suite, passed: 0, failed: 1, skipped: 0 }); // crashed before reporting
      if (r.code !== 0 && !mine.some((c) => c.failed > 0)) results[results.length - 1].failed++;
    };

    for (const part of parts) {
      if (part === 'types') {
        say('Type checks (tsc)');
        const counts = { suite: 'types', passed: 0, failed: 0, skipped: 0 };
        for (const project of ['tsconfig.api.json', 'tsconfig.e2e.json', 'tsconfig.app.json', 'tsconfig.spec.json']) {
          const r = await runLogged(process.execPath, [join('node_modules', 'typescript', 'bin', 'tsc'), '-p', project, '--noEmit'], env);
          if (r.code === 0) counts.passed++;
          else counts.failed++;
        }
        results.push(counts);
      }
      if (part === 'domain') await jasmineSuite('domain', 'spec/support/jasmine-domain.json');
      if (part === 'api') {
        const url = await recreateDatabase(cluster!, 'driftmark_api_test');
        await runMigrations(url);
        await jasmineSuite('api', 'spec/support/jasmine-api.json', { DATABASE_URL: url });
      }
      if (part === 'karma') {
        say('Suite karma (component specs in Chromium)');
        const r = await runLogged(process.execPath, [join('node_modules', '@angular', 'cli', 'bin', 'ng.js'), 'test', '--watch=false', '--no-progress'], env);
        // Karma's progress reporter: "Executed 12 of 14 (2 FAILED) (skipped 1)" — the last such line counts.
        const executed = [...r.output.matchAll(/Executed (\d+) of (\d+)(?: \((\d+) FAILED\))?(?: \(skipped (\d+)\))?/g)].pop();
        const failedN = executed ? Number(executed[3] ?? 0) : 0;
        const passedN = executed ? Number(executed[1]) - failedN : 0;
        const skippedN = executed ? Number(executed[4] ?? 0) : 0;
        results.push({ suite: 'karma', passed: passedN, failed: failedN + (r.code !== 0 && failedN === 0 ? 1 : 0), skipped: skippedN });
      }
      if (part === 'e2e') {
        say('Building the app for the end-to-end specs');
        try {
          buildApp((s) => say(s));
        } catch {
          results.push({ suite: 'e2e', passed: 0, failed: 1, skipped: 0 });
          continue;
        }
        const url = await recreateDatabase(cluster!, 'driftmark_e2e_test');
        await runMigrations(url);
        await jasmineSuite('e2e', 'spec/support/jasmine-e2e.json', { DATABASE_URL: url });
      }
    }
  } catch (e) {
    console.error(e);
    results.push({ suite: 'harness', passed: 0, failed: 1, skipped: 0 });
  } finally {
    if (cluster) {
      try {
        stopCluster(cluster, 'immediate');
      } catch (e) {
        console.error(e);
      }
    }
    if (testDataDir) rmSync(testDataDir, { recursive: true, force: true });
    rmSync(countsFile, { force: true });
  }

  const total = results.reduce((a, r) => ({ passed: a.passed + r.passed, failed: a.failed + r.failed, skipped: a.skipped + r.skipped }), { passed: 0, failed: 0, skipped: 0 });
  console.log('\n' + results.map((r) => `  ${r.suite.padEnd(8)} ${r.passed} passed, ${r.failed} failed${r.skipped ? `, ${r.skipped} skipped` : ''}`).join('\n'));
  console.log(`${total.passed} passed, ${total.failed} failed${total.skipped ? `, ${total.skipped} skipped` : ''}`);
  process.exit(total.failed > 0 || total.passed === 0 ? 1 : 0);
}

void main();
