/**
 * `npm run bench` — every timing target of Driftmark lives here, never in tests (issue 2).
 *
 *   npx tsx bench/run.ts [--check] [--only=domain|api|auth|library|survey|load] [--fresh-scaled]
 *
 * stdout: one JSON object per figure (the first one describes the machine); with --check, then
 * one PASS/FAIL line per target, and exit 1 when a gating target fails. Progress goes to stderr.
 * See bench/README.md for the groups, the targets and their sources.
 */
import { cpus, loadavg, totalmem } from 'node:os';
import { runDomain } from './domain';
import { progress, type Figure } from './lib/stats';

const GROUPS = ['domain', 'api', 'auth', 'library', 'survey', 'load'] as const;
type Group = (typeof GROUPS)[number];

function parseArgs(argv: string[]): { check: boolean; groups: Group[]; freshScaled: boolean } {
  let check = false;
  let freshScaled = false;
  let groups: Group[] = [...GROUPS];
  for (const arg of argv) {
    if (arg === '--check') check = true;
    else if (arg === '--fresh-scaled') freshScaled = true;
    else if (arg.startsWith('--only=')) {
      const wanted = arg.slice('--only='.length).split(',');
      for (const g of wanted) if (!(GROUPS as readonly string[]).includes(g)) throw new Error(`unknown group '${g}': use ${GROUPS.join(', ')}`);
      groups = GROUPS.filter((g) => wanted.includes(g));
    } else if (arg === '--help' || arg === '-h') {
      process.stderr.write('usage: npx tsx bench/run.ts [--check] [--only=domain|api|auth|library|survey|load] [--fresh-scaled]\n');
      process.exit(0);
    } else throw new Error(`unknown argument '${arg}'`);
  }
  return { check, groups, freshScaled };
}

async function main(): Promise<number> {
  const { check, groups, freshScaled } = parseArgs(process.argv.slice(2));
  const figures: Figure[] = [];
  const emit = (f: Figure): void => {
    figures.push(f);
    process.stdout.write(JSON.stringify(f) + '\n');
  };
  const cpu = cpus();
  emit({
    figure: 'machine',
    value: cpu.length,
    unit: 'cores',
    target: null,
    cpuModel: cpu[0]?.model ?? 'unknown',
    node: process.version,
    platform: `${process.platform}-${process.arch}`,
    memoryGiB: Math.round((totalmem() / 2 ** 30) * 10) / 10,
    // Other work on the machine inflates every figure: the 1, 5 and 15 min load averages at the start.
    loadAverage: loadavg().map((x) => Math.round(x * 100) / 100),
    groups,
    date: new Date().toISOString(),
  });
  const started = Date.now();
  if (groups.includes('domain')) {
    progress('group domain');
    await runDomain(emit);
  }
  if (groups.includes('api') || groups.includes('auth')) {
    const { runServerGroups } = await import('./api');
    await runServerGroups(emit, { api: groups.includes('api'), auth: groups.includes('auth') });
  }
  if (groups.includes('library')) {
    progress('group library');
    const { runLibrary } = await import('./library');
    await runLibrary(emit);
  }
  if (groups.includes('survey')) {
    progress('group survey');
    const { runSurvey } = await import('./survey');
    await runSurvey(emit, { freshScaled });
  }
  if (groups.includes('load')) {
    progress('group load');
    const { runLoad } = await import('./load');
    await runLoad(emit, { freshScaled: freshScaled && !groups.includes('survey') });
  }
  emit({ figure: 'machine.load-at-end', value: Math.round(loadavg()[0] * 100) / 100, unit: 'load (1 min)', target: null, seconds: Math.round((Date.now() - started) / 100) / 10 });
  progress(`done in ${((Date.now() - started) / 1000).toFixed(1)} s`);
  if (!check) return 0;
  let failed = 0;
  for (const f of figures) {
    if (f.target === null) continue;
    const ok = f.value <= f.target;
    const gating = f.gating !== false;
    if (!ok && gating) failed++;
    const stat = typeof f['stat'] === 'string' ? `${f['stat']} ` : '';
    process.stdout.write(`${ok ? 'PASS' : 'FAIL'} ${f.figure} (${stat}${f.value} ${f.unit}, target ≤ ${f.target})${gating ? '' : ' — information only, not counted'}\n`);
  }
  return failed > 0 ? 1 : 0;
}

main().then(
  (code) => process.exit(code),
  (e: unknown) => {
    process.stderr.write(`[bench] failed: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}\n`);
    process.exit(2);
  },
);
