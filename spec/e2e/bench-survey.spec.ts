/**
 * The bench survey end to end (issue #5): keying readings on the grid with the keyboard only (the
 * verdict shows at once and the API confirms it; the focus moves on), and nothing lost while the
 * API is away — readings typed with the server stopped wait in the browser across a reload of the
 * tab and arrive once each, in order, when the server is back (a server of its own, stopped and
 * started again on the same port).
 */
import type { Page } from 'playwright-core';
import type { RunningServer } from '../../api/server';
import { apiSignIn, DEMO, freePort, newContext, shellCached, signIn, startAppServer, url } from '../support/e2e-env';

interface Made {
  setId: number;
  surveyId: number;
}

/** A set on the demo amplifier's template and a fresh intake survey of it, through the API. */
async function setAndSurvey(base: string, label: string): Promise<Made & { token: string }> {
  const s = await apiSignIn(DEMO.tech, undefined, base);
  const headers = { 'content-type': 'application/json', authorization: `Bearer ${s.accessToken}` };
  const lib = (await (await fetch(`${base}/api/templates?q=QA-10`, { headers })).json()) as { items: { id: number; model: string }[] };
  const template = lib.items.find((t) => t.model === 'QA-10')!;
  const set = await fetch(`${base}/api/sets`, { method: 'POST', headers, body: JSON.stringify({ templateId: template.id, label, serial: 'E2E-1' }) });
  expect(set.status).withContext(await set.clone().text()).toBe(201);
  const setId = ((await set.json()) as { id: number }).id;
  const survey = await fetch(`${base}/api/sets/${setId}/surveys`, { method: 'POST', headers, body: JSON.stringify({ purpose: 'intake' }) });
  expect(survey.status).withContext(await survey.clone().text()).toBe(201);
  const surveyId = ((await survey.json()) as { survey: { id: number } }).survey.id;
  return { setId, surveyId, token: s.accessToken };
}

async function storedReadings(base: string, surveyId: number): Promise<{ testPointKey: string; text: string }[]> {
  const s = await apiSignIn(DEMO.tech, undefined, base);
  const r = await fetch(`${base}/api/surveys/${surveyId}`, { headers: { authorization: `Bearer ${s.accessToken}` } });
  expect(r.status).toBe(200);
  return ((await r.json()) as { readings: { testPointKey: string; text: string }[] }).readings;
}

const inputs = (page: Page) => page.locator('input.reading-input');
const focusedKey = (page: Page) => page.evaluate(() => (document.activeElement as HTMLElement | null)?.getAttribute('data-key') ?? null);

describe('The bench survey grid', () => {
  it('keys readings with the keyboard only: the verdict shows, the API confirms it, the focus moves to the next row', async () => {
    const made = await setAndSurvey(url(''), 'E2E grid set');
    const { context, watch } = await newContext();
    const page = await context.newPage();
    await signIn(page, DEMO.tech);
    await page.goto(url(`/surveys/${made.surveyId}`));
    await inputs(page).first().waitFor();
    const keys = await inputs(page).evaluateAll((els) => els.map((e) => e.getAttribute('data-key')));
    await inputs(page).first().focus();
    await page.keyboard.type('4k7');
    await page.keyboard.press('Enter');
    // The focus moved on to the second row, and the first row shows a verdict word with its mark.
    await page.waitForFunction((k) => document.activeElement?.getAttribute('data-key') === k, keys[1]);
    const first = page.locator('tr', { has: page.locator(`input[data-key="${keys[0]}"]`) });
    await first.locator('[data-mark="confirmed"]').waitFor();
    expect((await first.locator('td.verdict').innerText()).trim()).toMatch(/in band|near limit|high|low|open|short|inconclusive/i);
    // A state key: `o` is open, stored as a state, and the focus moves again.
    await page.keyboard.press('o');
    await page.waitForFunction((k) => document.activeElement?.getAttribute('data-key') === k, keys[2]);
    const stored = await storedReadings(url(''), made.surveyId);
    expect(stored.map((r) => r.testPointKey)).toEqual([keys[0]!, keys[1]!]);
    expect(stored[0].text).toBe('4k7');
    // Text the core cannot parse is refused in place and nothing is stored (the twin above was stored).
    await page.keyboard.type('4k7k');
    await page.keyboard.press('Enter');
    await page.locator('td.entry [role="alert"]').first().waitFor();
    expect(await focusedKey(page)).toBe(keys[2]);
    expect((await storedReadings(url(''), made.surveyId)).length).toBe(2);
    expect(watch.pageErrors).toEqual([]);
    expect(watch.csp).toEqual([]);
  });

  it('keeps readings typed while the server is away across a reload, and sends each once, in order, when it is back', async () => {
    const port = await freePort();
    let server: RunningServer = await startAppServer({}, port);
    try {
      const base = server.url;
      const made = await setAndSurvey(base, 'E2E offline set');
      const { context } = await newContext();
      const page = await context.newPage();
      await signIn(page, DEMO.tech, undefined, base);
      await page.goto(`${base}/surveys/${made.surveyId}`);
      await inputs(page).first().waitFor();
      await shellCached(page);
      const keys = await inputs(page).evaluateAll((els) => els.map((e) => e.getAttribute('data-key')!));

      await server.close();
      await inputs(page).first().focus();
      for (const text of ['1k', '2k2', '3k3']) {
        await page.keyboard.type(text);
        await page.keyboard.press('Enter');
      }
      await page.locator('[data-test="waiting"]').getByText('3 writes wait').waitFor();

      // A reload with the server gone: the shell from the service worker, the survey and the waiting readings from IndexedDB.
      await page.reload();
      await inputs(page).first().waitFor();
      await page.locator('[data-test="waiting"]').getByText('3 writes wait').waitFor();
      await page.locator('[data-test="offline"]').waitFor();

      server = await startAppServer({}, port);
      // Sent on the sender's next retry (backoff up to 30 s), without a click.
      await page.locator('[data-test="waiting"]').waitFor({ state: 'detached', timeout: 45_000 });
      const stored = await storedReadings(base, made.surveyId);
      expect(stored.map((r) => r.text)).toEqual(['1k', '2k2', '3k3']);
      expect(stored.map((r) => r.testPointKey)).toEqual(keys.slice(0, 3));
    } finally {
      await server.close().catch(() => undefined);
    }
  });
});
