/**
 * The e2e suite's global set-up: the mail fake, the demo accounts, the real server and one
 * Chromium before all specs; every browser context a spec opened closed after it; all stopped
 * after the suite. Specs import their helpers from ./e2e-env.
 */
import { closeContexts, startE2e, stopE2e } from './e2e-env';

// A real browser, bcrypt and the mail queue's polling: allow a minute per spec.
jasmine.DEFAULT_TIMEOUT_INTERVAL = 60_000;

beforeAll(async () => {
  await startE2e();
}, 60_000);

afterEach(async () => {
  await closeContexts();
});

afterAll(async () => {
  await stopE2e();
}, 30_000);
