/**
 * Two browsers editing one survey (issue 7, "Faults"): no lost update, and the conflict is shown
 * with both values. The owner of a set (browser A) and a technician the set is shared with
 * (browser B) have the same draft survey open with the same stored reading. A corrects it (F2, a
 * new value, Enter) and it is stored; B, still holding the old version, corrects it too: the
 * server refuses B's write (409), B's row detail shows the saved value and B's side by side, and
 * A's value stays stored. Then B either keeps the saved value or saves its own over it.
 */
import type { Page, Response } from 'playwright-core';
import { apiSignIn, makeUser, newContext, signIn, url } from '../support/e2e-env';

const PASSWORD = 'two-browsers-42';

interface StoredReading {
  id: number;
  testPointKey: string;
  text: string;
  version: number;
}

interface Scene {
  surveyId: number;
  key: string;
  a: Page;
  b: Page;
  bAnswers: { method: string; path: string; status: number }[];
  ownerName: string;
  ownerToken: string;
}

async function api(path: string, token: string, init: { method?: string; body?: unknown } = {}) {
  return fetch(url(path), {
    method: init.method ?? 'GET',
    headers: { 'content-type': 'application/json', authorization: `Bearer ${token}` },
    ...(init.body === undefined ? {} : { body: JSON.stringify(init.body) }),
  });
}

/** The readings of a survey as the API stores them. */
async function stored(surveyId: number, token: string): Promise<StoredReading[]> {
  const r = await api(`/api/surveys/${surveyId}`, token);
  expect(r.status).toBe(200);
  return ((await r.json()) as { readings: StoredReading[] }).readings;
}

const inputOf = (page: Page, key: string) => page.locator(`input.reading-input[data-key="${key}"]`);
const rowOf = (page: Page, key: string) => page.locator('tr', { has: inputOf(page, key) });

/** F2 on the row, the new value typed over the old one, Enter. */
async function correct(page: Page, key: string, text: string): Promise<void> {
  await inputOf(page, key).focus();
  await page.keyboard.press('F2');
  await page.waitForFunction((k) => (document.querySelector(`input[data-key="${k}"]`) as HTMLInputElement | null)?.classList.contains('correcting') === true, key);
  await page.keyboard.type(text);
  await page.keyboard.press('Enter');
}

/**
 * The owner's set (on the demo amplifier's template) shared with a second technician, a draft
 * intake survey, its first reading keyed in browser A, and the survey open in both browsers.
 */
async function scene(label: string): Promise<Scene> {
  const owner = await makeUser(['technician'], PASSWORD, { name: 'Iris Calloway' });
  const other = await makeUser(['technician'], PASSWORD, { name: 'Bram Oduya' });
  const s = await apiSignIn(owner.email, PASSWORD);
  const lib = (await (await api('/api/templates?q=QA-10', s.accessToken)).json()) as { items: { id: number; model: string }[] };
  const template = lib.items.find((t) => t.model === 'QA-10')!;
  const set = await api('/api/sets', s.accessToken, { method: 'POST', body: { templateId: template.id, label, serial: 'E2E-2B' } });
  expect(set.status).withContext(await set.clone().text()).toBe(201);
  const setId = ((await set.json()) as { id: number }).id;
  const shared = await api(`/api/sets/${setId}/sharing`, s.accessToken, { method: 'PUT', body: { userIds: [other.id] } });
  expect(shared.status).withContext(await shared.clone().text()).toBe(200);
  const survey = await api(`/api/sets/${setId}/surveys`, s.accessToken, { method: 'POST', body: { purpose: 'intake' } });
  expect(survey.status).withContext(await survey.clone().text()).toBe(201);
  const surveyId = ((await survey.json()) as { survey: { id: number } }).survey.id;

  // Browser A keys the first reading.
  // No service worker: it passes /api/ through anyway, and without it each exchange is seen once, from the page.
  const a = await (await newContext({ serviceWorkers: 'block' })).context.newPage();
  await signIn(a, owner.email, PASSWORD);
  await a.goto(url(`/surveys/${surveyId}`));
  const first = a.locator('input.reading-input').first();
  await first.waitFor();
  const key = (await first.getAttribute('data-key'))!;
  await first.focus();
  await a.keyboard.type('100k');
  await a.keyboard.press('Enter');
  await rowOf(a, key).locator('[data-mark="confirmed"]').waitFor();

  // Browser B opens the survey once the reading is stored: both hold it at version 1.
  const { context: bContext } = await newContext({ serviceWorkers: 'block' });
  const bAnswers: Scene['bAnswers'] = [];
  bContext.on('response', (r: Response) => {
    const path = new URL(r.url()).pathname;
    if (path.startsWith('/api/surveys/')) bAnswers.push({ method: r.request().method(), path, status: r.status() });
  });
  const b = await bContext.newPage();
  await signIn(b, other.email, PASSWORD);
  await b.goto(url(`/surveys/${surveyId}`));
  await rowOf(b, key).locator('[data-test="current"]').getByText('100k', { exact: true }).waitFor();
  const before = await stored(surveyId, s.accessToken);
  expect(before.map((r) => [r.testPointKey, r.text, r.version])).toEqual([[key, '100k', 1]]);
  return { surveyId, key, a, b, bAnswers, ownerName: owner.name, ownerToken: s.accessToken };
}

/** A corrects (stored, version 2); B corrects from version 1: refused 409, both values shown, A's value kept. */
async function conflictInB(sc: Scene, bValue: string): Promise<void> {
  const { a, b, key, surveyId } = sc;
  // A's correction is the positive twin of B's: the same PATCH from the current version is stored.
  await correct(a, key, '150k');
  await rowOf(a, key).locator('[data-test="current"]').getByText('150k', { exact: true }).waitFor();
  await a.waitForFunction((k) => document.querySelector(`input[data-key="${k}"]`)?.classList.contains('correcting') === false, key);
  expect((await stored(surveyId, sc.ownerToken)).map((r) => [r.text, r.version])).toEqual([['150k', 2]]);

  // B still shows the old value and corrects it from version 1.
  expect((await rowOf(b, key).locator('[data-test="current"]').innerText()).trim()).toBe('100k');
  const refused = b.waitForResponse((r) => r.request().method() === 'PATCH' && /\/api\/surveys\/\d+\/readings\/\d+$/.test(new URL(r.url()).pathname));
  await correct(b, key, bValue);
  const answer = await refused;
  expect(answer.status()).toBe(409);
  // The edit was sent from the version B held.
  expect(answer.request().postDataJSON() as unknown).toEqual({ version: 1, text: bValue });

  // B's screen: the row says why, and the row detail shows the saved value (A's, version 2) and B's.
  await rowOf(b, key).getByRole('alert').getByText('Changed meanwhile: both values are shown beside the row.').waitFor();
  const conflict = b.locator('dm-row-detail [data-test="conflict"]');
  await conflict.waitFor();
  expect(await conflict.getByRole('heading', { name: 'Changed meanwhile' }).count()).toBe(1);
  const theirs = await conflict.locator('[data-test="theirs"]').innerText();
  expect(theirs).toContain('150k');
  expect(theirs).toContain('(version 2)');
  expect(theirs).toContain(sc.ownerName);
  expect((await conflict.locator('[data-test="yours"]').innerText()).trim()).toBe(bValue);

  // Nothing of A's was lost.
  const after = await stored(surveyId, sc.ownerToken);
  expect(after.map((r) => [r.testPointKey, r.text, r.version])).toEqual([[key, '150k', 2]]);
}

describe('Two browsers editing one survey', () => {
  it('refuses the stale correction (409), shows both values, loses nothing, and keeps the saved value when asked', async () => {
    const sc = await scene('E2E two browsers, keep');
    await conflictInB(sc, '220k');
    const { b, key, surveyId } = sc;
    const patches = () => sc.bAnswers.filter((x) => x.method === 'PATCH').length;
    const sent = patches();

    await b.locator('[data-test="conflict"]').getByRole('button', { name: 'Keep the saved value' }).click();
    await b.locator('[data-test="conflict"]').waitFor({ state: 'detached' });
    await rowOf(b, key).locator('[data-test="current"]').getByText('150k', { exact: true }).waitFor();
    // Keeping writes nothing: A's value stays, at version 2.
    expect(patches()).toBe(sent);
    expect((await stored(surveyId, sc.ownerToken)).map((r) => [r.text, r.version])).toEqual([['150k', 2]]);

    // B now holds version 2: a correction from it is stored (version 3).
    await correct(b, key, '160k');
    await rowOf(b, key).locator('[data-test="current"]').getByText('160k', { exact: true }).waitFor();
    expect((await stored(surveyId, sc.ownerToken)).map((r) => [r.text, r.version])).toEqual([['160k', 3]]);
  });

  it('refuses the stale correction (409), shows both values, and saves B’s value over the saved one when asked', async () => {
    const sc = await scene('E2E two browsers, mine');
    await conflictInB(sc, '220k');
    const { b, key, surveyId } = sc;

    const saved = b.waitForResponse((r) => r.request().method() === 'PATCH' && /\/api\/surveys\/\d+\/readings\/\d+$/.test(new URL(r.url()).pathname));
    await b.locator('[data-test="conflict"]').getByRole('button', { name: 'Save mine over it' }).click();
    const answer = await saved;
    expect(answer.status()).toBe(200);
    // Sent against the saved version (2), so it is a deliberate overwrite, not a lost update.
    expect((answer.request().postDataJSON() as { version: number; text: string })).toEqual({ version: 2, text: '220k' });
    await b.locator('[data-test="conflict"]').waitFor({ state: 'detached' });
    await rowOf(b, key).locator('[data-test="current"]').getByText('220k', { exact: true }).waitFor();
    expect((await stored(surveyId, sc.ownerToken)).map((r) => [r.text, r.version])).toEqual([['220k', 3]]);
  });
});
