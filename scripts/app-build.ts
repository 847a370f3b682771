/** Builds the Angular app when the build is missing or older than its sources. */
import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { PROJECT_ROOT } from './cluster';

export const APP_DIST = join(PROJECT_ROOT, 'dist', 'driftmark', 'browser');
const SOURCES = ['src', 'api/domain', 'angular.json', 'ngsw-config.json', 'tsconfig.json', 'tsconfig.app.json', 'package-lock.json'];

function newestMtime(path: string): number {
  if (!existsSync(path)) return 0;
  const st = statSync(path);
  if (!st.isDirectory()) return st.mtimeMs;
  let newest = st.mtimeMs;
  for (const entry of readdirSync(path)) newest = Math.max(newest, newestMtime(join(path, entry)));
  return newest;
}

export function appBuildIsStale(): boolean {
  const index = join(APP_DIST, 'index.html');
  if (!existsSync(index)) return true;
  const built = statSync(index).mtimeMs;
  return SOURCES.some((s) => newestMtime(join(PROJECT_ROOT, s)) > built);
}

/** Runs `ng build`; `toStderr` sends the build's own output to stderr (the bench keeps stdout for its figures). */
export function buildApp(log: (s: string) => void = console.log, toStderr = false): void {
  log('Building the Angular app (ng build)…');
  const r = spawnSync(process.execPath, [join(PROJECT_ROOT, 'node_modules', '@angular', 'cli', 'bin', 'ng.js'), 'build'], {
    cwd: PROJECT_ROOT,
    stdio: toStderr ? ['ignore', process.stderr, process.stderr] : 'inherit',
    env: { ...process.env, NG_CLI_ANALYTICS: 'false' },
  });
  if (r.status !== 0) throw new Error('ng build failed (see above).');
}
