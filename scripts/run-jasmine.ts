/**
 * Runs one jasmine suite (a config file under spec/support) in this process and appends its
 * counts as one JSON line to DRIFTMARK_COUNTS_FILE, so `npm test` can total every suite.
 * Usage: node --import tsx scripts/run-jasmine.ts spec/support/jasmine-api.json [spec files…]
 */
import { appendFileSync } from 'node:fs';
import { resolve } from 'node:path';
import Jasmine from 'jasmine';

const [configFile, ...files] = process.argv.slice(2);
const suite = process.env.DRIFTMARK_SUITE ?? configFile;
const jasmine = new Jasmine({ projectBaseDir: resolve('.') });
jasmine.loadConfigFile(configFile);
jasmine.exitOnCompletion = false;
let passed = 0;
let failed = 0;
let skipped = 0;
jasmine.addReporter({
  specDone(r) {
    if (r.status === 'passed') passed++;
    else if (r.status === 'failed') failed++;
    else skipped++;
  },
  suiteDone(r) {
    // An error in afterAll/beforeAll fails the suite without failing a spec: count it.
    if (r.status === 'failed') failed++;
  },
});
const result = await jasmine.execute(files.length ? files : undefined);
if (result.overallStatus === 'incomplete' && failed === 0) failed++; // e.g. fdescribe left behind, or no specs
if (process.env.DRIFTMARK_COUNTS_FILE) {
  appendFileSync(process.env.DRIFTMARK_COUNTS_FILE, JSON.stringify({ suite, passed, failed, skipped }) + '\n');
}
console.log(`${suite}: ${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
process.exit(failed > 0 ? 1 : 0);
