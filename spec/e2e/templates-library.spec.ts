/**
 * Chassis templates in the browser, the library side: the technician finds the demo templates
 * (search by tube type, sort, server pages) and opens one; copies one and sends a correction the
 * author accepts; a student cannot author and the technician cannot see someone else's private
 * template (each refusal beside its positive twin); export a version as JSON and import it again,
 * and a broken document is refused with its JSON paths and nothing imported. Every page stays on
 * 127.0.0.1, with no console error, no uncaught error and no CSP violation.
 */
import { readFileSync } from 'node:fs';
import { randomBytes } from 'node:crypto';
import type { Locator, Page } from 'playwright-core';
import { DEMO, apiSignIn, e2e, makeUser, newPage, signIn, type PageWatch } from '../support/e2e-env';

async function api(path: string, token: string, method = 'GET', body?: unknown): Promise<Response> {
  return fetch(e2e().baseUrl + path, {
    method,
    headers: { authorization: `Bearer ${token}`, ...(body !== undefined ? { 'content-type': 'application/json' } : {}) },
    body: body !== undefined ? JSON.stringify(body) : undefined,
  });
}

async function json<T>(r: Response, status: number, what: string): Promise<T> {
  const text = await r.text();
  if (r.status !== status) throw new Error(`${what} answered ${r.status} (expected ${status}): ${text}`);
  return JSON.parse(text) as T;
}

interface Row {
  id: number;
  maker: string;
  model: string;
  authorName: string;
}

/** The one library row whose model is `model` (as the caller sees the library). */
async function demoRow(token: string, model: string): Promise<Row> {
  const page = await json<{ items: Row[] }>(await api('/api/templates?q=' + encodeURIComponent(model), token), 200, 'library search');
  const row = page.items.find((t) => t.model === model);
  if (!row) throw new Error(`No demo template ${model} in the library`);
  return row;
}

/**
 * Nothing off the machine, no console or uncaught error, no CSP violation, and no failed request
 * but the refusals the spec provokes on purpose (`expected`: "STATUS METHOD" and a URL pattern).
 */
function expectClean(watch: PageWatch, who: string, expected: RegExp[] = []): void {
  const unexpected = (line: string) => !expected.some((e) => e.test(line));
  expect(watch.foreign).withContext(`${who}: requests off 127.0.0.1`).toEqual([]);
  // Chromium logs every 4xx answer as "Failed to load resource": those of the provoked refusals are expected.
  const provoked = watch.failures.filter((f) => !unexpected(f)).map((f) => f.split(' ')[0]);
  expect(watch.consoleErrors.filter((e) => !provoked.some((s) => e.includes(`status of ${s}`)))).withContext(`${who}: console errors`).toEqual([]);
  expect(watch.pageErrors).withContext(`${who}: uncaught errors`).toEqual([]);
  expect(watch.csp).withContext(`${who}: CSP violations`).toEqual([]);
  expect(watch.failures.filter(unexpected)).withContext(`${who}: failed requests`).toEqual([]);
}

/** Polls `probe` until it returns true (a failed wait names what it waited for). */
async function until(probe: () => Promise<boolean>, what: string, ms = 10_000): Promise<void> {
  const end = Date.now() + ms;
  while (Date.now() < end) {
    if (await probe()) return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`Timed out waiting for ${what}`);
}

const libraryTable = (page: Page): Locator => page.getByRole('table', { name: 'Chassis templates' });
/** The makers of the rows shown, in order (the first cell's link). */
const makers = (page: Page): Promise<string[]> => libraryTable(page).locator('tr.row td:first-child a.open').allTextContents().then((l) => l.map((s) => s.trim()));

async function chooseOption(page: Page, combobox: Locator, option: string | RegExp): Promise<void> {
  await combobox.click();
  await page.getByRole('option', { name: option }).click();
}

describe('Chassis templates: the library', () => {
  let author: string;
  let tech: string;

  beforeAll(async () => {
    author = (await apiSignIn(DEMO.author)).accessToken;
    tech = (await apiSignIn(DEMO.tech)).accessToken;
  });

  it('lists the demo templates to the technician, narrows by a tube type, sorts and pages on the server, and opens a template with its versions', async () => {
    // Twelve public templates of a maker of this spec's own (a second author), so the pages are known.
    const maker = `Pagewell ${randomBytes(3).toString('hex')}`;
    const other = await makeUser(['author', 'technician'], 'library-author-1');
    const otherToken = (await apiSignIn(other.email, 'library-author-1')).accessToken;
    for (let i = 1; i <= 12; i++) {
      const created = await json<{ id: number }>(
        await api('/api/templates', otherToken, 'POST', { chassis: { maker, model: `P-${String(i).padStart(2, '0')}`, kind: 'table-radio', power: 'transformer' } }),
        201,
        'create',
      );
      await json(await api(`/api/templates/${created.id}/publish`, otherToken, 'POST', { changelog: 'First issue' }), 201, 'publish');
      await json(await api(`/api/templates/${created.id}/sharing`, otherToken, 'PUT', { visibility: 'public', userIds: [] }), 200, 'share');
    }

    const { page, watch } = await newPage();
    await signIn(page, DEMO.tech);
    await page.goto(e2e().baseUrl + '/templates');
    await page.getByRole('heading', { level: 1, name: 'Template library' }).waitFor();
    const table = libraryTable(page);
    for (const m of ['Marrowfield Radio Works', 'Vellacott & Sons', 'Quenby Audio']) {
      await table.getByRole('link', { name: m, exact: true }).first().waitFor();
    }
    // The technician is no author: no "New template", no "Import".
    expect(await page.getByRole('button', { name: 'New template' }).count()).toBe(0);

    // EZ81 sits only in the demo amplifier (Quenby QA-10): the tube-type filter narrows to it.
    await page.getByRole('button', { name: /^Filters/ }).click();
    await page.getByRole('textbox', { name: 'Tube type' }).fill('EZ81');
    await until(async () => (await makers(page)).join('|') === 'Quenby Audio', 'the rows of the EZ81 search');
    expect(watch.requests.some((u) => /\/api\/templates\?.*tubeType=EZ81/.test(u))).withContext('the filter went to the server').toBeTrue();
    expect(await page.getByRole('button', { name: 'Filters (1)' }).count()).toBe(1);
    // Its positive twin: the console's 6SN7GT shows the console and not the amplifier.
    await page.getByRole('textbox', { name: 'Tube type' }).fill('6SN7GT');
    await until(async () => (await makers(page)).includes('Vellacott & Sons'), 'the rows of the 6SN7GT search');
    expect(await makers(page)).not.toContain('Quenby Audio');
    await page.getByRole('button', { name: 'Clear filters' }).click();

    // This spec's own twelve, by maker, sorted by model (A–Z) and in pages of ten.
    await page.getByRole('searchbox', { name: /Search maker, model/ }).fill(maker);
    await until(async () => (await page.getByRole('status').filter({ hasText: /^\s*12 templates/ }).count()) === 1, 'the count of 12');
    await chooseOption(page, page.getByRole('combobox', { name: 'Sort by' }), 'Model (A–Z)');
    await until(async () => watch.requests.some((u) => /\/api\/templates\?.*sort=model/.test(u)), 'a request sorted by model');
    await until(async () => (await table.locator('tr.row td.mat-column-model').first().textContent())?.trim() === 'P-01', 'P-01 first');
    const models = async () => (await table.locator('tr.row td.mat-column-model').allTextContents()).map((s) => s.trim());
    expect((await models()).slice(0, 3)).toEqual(['P-01', 'P-02', 'P-03']);
    // Most used / recently updated come first by default: the order changed because the sort did.
    expect(await page.getByRole('status').filter({ hasText: 'model (a–z) first' }).count()).toBe(1);

    // The paginator's select sits under its touch target, which opens it.
    await page.getByRole('combobox', { name: 'Items per page:' }).waitFor();
    await page.locator('mat-paginator .mat-mdc-paginator-touch-target').click();
    await page.getByRole('option', { name: '10', exact: true }).click();
    await until(async () => (await models()).length === 10, 'ten rows');
    await page.getByRole('button', { name: 'Next page' }).click();
    await until(async () => (await models()).length === 2, 'the two rows of page 2');
    expect(await models()).toEqual(['P-11', 'P-12']);
    expect(watch.requests.some((u) => /\/api\/templates\?(?=.*page=2)(?=.*pageSize=10)(?=.*sort=model)/.test(u))).withContext('page 2 asked of the server').toBeTrue();
    expect(await page.getByText('11 – 12 of 12').count()).toBe(1);

    // Opening a row: the console's page with its two published versions.
    await page.getByRole('searchbox', { name: /Search maker, model/ }).fill('Larkspur');
    await table.getByRole('link', { name: 'Vellacott & Sons', exact: true }).waitFor();
    await table.locator('tr.row').filter({ hasText: 'Larkspur 7-P' }).locator('td.mat-column-model').click();
    await page.waitForURL(/\/templates\/\d+$/);
    await page.getByRole('heading', { level: 1, name: 'Vellacott & Sons Larkspur 7-P' }).waitFor();
    const versions = page.locator('section[aria-labelledby="versions-title"] li.version');
    await versions.first().waitFor();
    expect(await versions.count()).toBe(2);
    expect(await versions.filter({ hasText: 'Version 2' }).filter({ hasText: 'Matched positions of the push-pull output' }).count()).toBe(1);
    expect(await versions.filter({ hasText: 'Version 1' }).filter({ hasText: 'First issue: component checks' }).count()).toBe(1);
    // Not the owner: no publishing, no editing.
    expect(await page.getByRole('link', { name: 'Edit draft' }).count()).toBe(0);
    expectClean(watch, 'technician in the library');
  }, 120_000);

  it('lets the technician copy a demo template (origin and author credited) and send a correction the author accepts into the draft', async () => {
    const kestrel = await demoRow(tech, 'Kestrel 5');
    const quenby = await demoRow(tech, 'QA-10');
    const { page, watch } = await newPage();
    await signIn(page, DEMO.tech);

    // Copy version 1 of the AC/DC set.
    await page.goto(`${e2e().baseUrl}/templates/${kestrel.id}`);
    await page.getByRole('heading', { level: 1, name: 'Marrowfield Radio Works Kestrel 5' }).waitFor();
    await page.getByRole('button', { name: 'Copy' }).click();
    await page.waitForURL((u) => /\/templates\/\d+$/.test(u.pathname) && u.pathname !== `/templates/${kestrel.id}`);
    const copyId = Number(new URL(page.url()).pathname.split('/').pop());
    await page.getByText(/Copied from/).waitFor();
    const origin = (await page.locator('p.origin').textContent())!.replace(/\s+/g, ' ');
    expect(origin).toContain(`template ${kestrel.id}`);
    expect(origin).toContain('version 1');
    expect(origin).toContain(`by ${kestrel.authorName}`);
    // The copy is the technician's own and private; the original stays the author's.
    expect((await page.locator('p.byline').textContent())!).toMatch(/private/i);
    const copy = await json<{ own: boolean; visibility: string }>(await api(`/api/templates/${copyId}`, tech), 200, 'the copy');
    expect(copy).toEqual(jasmine.objectContaining({ own: true, visibility: 'private' }));
    const original = await json<{ own: boolean }>(await api(`/api/templates/${kestrel.id}`, tech), 200, 'the original');
    expect(original.own).toBeFalse();

    // A correction on a component of the amplifier.
    const before = await json<{ draft: { revision: number } | null; latestVersion: number }>(await api(`/api/templates/${quenby.id}`, author), 200, 'the amplifier');
    await page.goto(`${e2e().baseUrl}/templates/${quenby.id}`);
    await page.getByRole('heading', { level: 1, name: 'Quenby Audio QA-10' }).waitFor();
    await page.getByRole('button', { name: 'Send a correction' }).click();
    const dialog = page.getByRole('dialog', { name: 'Send a correction' });
    await dialog.getByRole('combobox', { name: 'Component or test point' }).click();
    const firstComponent = page.getByRole('group', { name: 'Components' }).getByRole('option').first();
    const optionText = (await firstComponent.textContent())!.trim();
    const ref = optionText.split(' ')[0];
    await firstComponent.click();
    await dialog.getByRole('textbox', { name: 'Tolerance (%)' }).fill('5');
    const note = `${ref} carries a gold band on my set (${randomBytes(3).toString('hex')}).`;
    // Refused first: a correction without its note names the field and sends nothing.
    await dialog.getByRole('button', { name: 'Send' }).click();
    await dialog.getByText('Say why, and from which source.').waitFor();
    await dialog.getByRole('textbox', { name: 'Note to the author' }).fill(note);
    await dialog.getByRole('button', { name: 'Send' }).click();
    await page.getByText('Correction sent to the author.').waitFor();
    await page.getByRole('heading', { level: 2, name: 'Your corrections' }).waitFor();
    expect(await page.locator('li.correction').filter({ hasText: note }).count()).toBe(1);
    expectClean(watch, 'technician copying and correcting');

    // The author finds it in the inbox and accepts it into the draft.
    const { page: a, watch: aw } = await newPage();
    await signIn(a, DEMO.author);
    await a.goto(`${e2e().baseUrl}/templates/${quenby.id}`);
    await a.getByRole('heading', { level: 2, name: 'Corrections inbox' }).waitFor();
    const mine = a.locator('li.correction').filter({ hasText: note });
    await mine.waitFor();
    expect((await mine.textContent())!).toContain(`component ${ref}`);
    expect((await mine.getAttribute('data-state'))!).toBe('open');
    expect((await mine.locator('ul.change').textContent())!).toContain('tolerancePct: 5');
    await mine.getByRole('button', { name: 'Accept' }).click();
    const confirm = a.getByRole('dialog', { name: 'Accept the correction' });
    await confirm.getByRole('textbox', { name: 'Note (optional)' }).fill('Thank you: the parts list agrees.');
    await confirm.getByRole('button', { name: 'Accept into the draft' }).click();
    await a.getByText(/Accepted: the draft is now at revision \d+\./).waitFor();
    await until(async () => (await mine.getAttribute('data-state')) === 'accepted', 'the correction marked accepted');

    const after = await json<{ draft: { revision: number } | null }>(await api(`/api/templates/${quenby.id}`, author), 200, 'the amplifier after');
    expect(after.draft).not.toBeNull();
    expect(after.draft!.revision).toBeGreaterThan(before.draft?.revision ?? 0);
    const shown = (await a.getByText(/Accepted: the draft is now at revision \d+\./).textContent())!;
    expect(shown).toContain(`revision ${after.draft!.revision}.`);
    const draft = await json<{ content: { components: { ref: string; tolerancePct: number | null }[] } }>(await api(`/api/templates/${quenby.id}/draft`, author), 200, 'the draft');
    expect(draft.content.components.find((c) => c.ref === ref)?.tolerancePct).toBe(5);
    expectClean(aw, 'author accepting');
  }, 120_000);

  it('gives a student no "New template" and refuses their POST /api/templates with 403, while the author creates one (201)', async () => {
    const { page, watch } = await newPage();
    await signIn(page, DEMO.student);
    await page.goto(e2e().baseUrl + '/templates');
    await page.getByRole('heading', { level: 1, name: 'Template library' }).waitFor();
    await libraryTable(page).getByRole('link', { name: 'Quenby Audio', exact: true }).waitFor();
    expect(await page.getByRole('button', { name: 'New template' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Import' }).count()).toBe(0);
    const chassis = { maker: 'Refusal Radio Co.', model: 'R-1', kind: 'table-radio', power: 'transformer' };
    const student = (await apiSignIn(DEMO.student)).accessToken;
    const refused = await api('/api/templates', student, 'POST', { chassis });
    expect(refused.status).toBe(403);
    expectClean(watch, 'student in the library');

    // The positive twins: the author has the button, and the same body creates a template.
    const { page: a, watch: aw } = await newPage();
    await signIn(a, DEMO.author);
    await a.goto(e2e().baseUrl + '/templates');
    await a.getByRole('button', { name: 'New template' }).waitFor();
    expect(await a.getByRole('button', { name: 'Import' }).count()).toBe(1);
    const created = await api('/api/templates', author, 'POST', { chassis });
    expect(created.status).toBe(201);
    expectClean(aw, 'author in the library');
  });

  it('shows the technician "not available" for the author\'s private template while the owner opens it', async () => {
    const maker = `Hidden Works ${randomBytes(3).toString('hex')}`;
    const created = await json<{ id: number; visibility: string }>(
      await api('/api/templates', author, 'POST', { chassis: { maker, model: 'H-2', kind: 'console', power: 'transformer' } }),
      201,
      'create',
    );
    expect(created.visibility).toBe('private');
    const path = `${e2e().baseUrl}/templates/${created.id}`;

    const { page, watch } = await newPage();
    await signIn(page, DEMO.tech);
    await page.goto(path);
    await page.getByRole('heading', { level: 1, name: 'Template not available' }).waitFor();
    await page.getByText('No such template, or it is not shared with you.').waitFor();
    expect(await page.getByRole('heading', { level: 1, name: `${maker} H-2` }).count()).toBe(0);
    expect((await api(`/api/templates/${created.id}`, tech)).status).toBe(404);
    expectClean(watch, 'technician on a private template', [new RegExp(`^404 GET .*/api/templates/${created.id}$`)]);

    const { page: a, watch: aw } = await newPage();
    await signIn(a, DEMO.author);
    await a.goto(path);
    await a.getByRole('heading', { level: 1, name: `${maker} H-2` }).waitFor();
    expect(await a.getByRole('link', { name: 'Edit draft' }).count()).toBe(1);
    expectClean(aw, 'owner on the private template');
  });

  it('exports a demo version as JSON and imports it as a new template; a broken document lists its problems with JSON paths and imports nothing', async () => {
    const quenby = await demoRow(author, 'QA-10');
    const count = async () => (await json<{ total: number }>(await api('/api/templates?pageSize=1', author), 200, 'library count')).total;
    const { page, watch } = await newPage();
    await signIn(page, DEMO.author);
    await page.goto(`${e2e().baseUrl}/templates/${quenby.id}`);
    await page.getByRole('heading', { level: 1, name: 'Quenby Audio QA-10' }).waitFor();
    // Export the first published version (the page shows the latest by default).
    await chooseOption(page, page.getByRole('combobox', { name: 'Version shown' }), /^Version 1 /);
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'Export JSON' }).click()]);
    expect(download.suggestedFilename()).toMatch(/\.json$/);
    const text = readFileSync((await download.path())!, 'utf8');
    const exported = JSON.parse(text) as { format: string; chassis: { maker: string; model: string }; components: { nodes: string[] }[] };
    expect(exported.format).toBe('driftmark-template');
    expect(exported.chassis).toEqual(jasmine.objectContaining({ maker: 'Quenby Audio', model: 'QA-10' }));

    // A broken copy first: a component on a node of a socket the template does not have.
    const broken = structuredClone(exported);
    broken.components[0].nodes[0] = 'V99.1';
    const n0 = await count();
    await page.goto(e2e().baseUrl + '/templates');
    await page.getByRole('button', { name: 'Import' }).click();
    let dialog = page.getByRole('dialog', { name: 'Import a template' });
    await dialog.getByRole('textbox', { name: 'Template JSON' }).fill(JSON.stringify(broken));
    await dialog.getByRole('button', { name: 'Import' }).click();
    await dialog.getByText(/(One problem|\d+ problems) found\. Nothing was imported\./).waitFor();
    const paths = (await dialog.getByRole('list', { name: 'Problems' }).locator('li code').allTextContents()).map((s) => s.trim());
    expect(paths).toContain('components[0].nodes[0]');
    expect(await count()).toBe(n0);
    await dialog.getByRole('button', { name: 'Cancel' }).click();
    await dialog.waitFor({ state: 'detached' });

    // The exported file itself, chosen as a file: a new private template with the demo's facts.
    await page.getByRole('button', { name: 'Import' }).click();
    dialog = page.getByRole('dialog', { name: 'Import a template' });
    await page.locator('#import-file').setInputFiles({ name: download.suggestedFilename(), mimeType: 'application/json', buffer: Buffer.from(text) });
    await dialog.getByText(download.suggestedFilename()).waitFor();
    await dialog.getByRole('button', { name: 'Import' }).click();
    await page.waitForURL((u) => /\/templates\/\d+$/.test(u.pathname) && u.pathname !== `/templates/${quenby.id}`);
    await page.getByRole('heading', { level: 1, name: 'Quenby Audio QA-10' }).waitFor();
    const importedId = Number(new URL(page.url()).pathname.split('/').pop());
    expect(importedId).not.toBe(quenby.id);
    expect(await count()).toBe(n0 + 1);
    const imported = await json<{ own: boolean; visibility: string }>(await api(`/api/templates/${importedId}`, author), 200, 'the import');
    expect(imported).toEqual(jasmine.objectContaining({ own: true, visibility: 'private' }));
    expectClean(watch, 'author importing', [/^400 POST .*\/api\/templates\/import$/]);
  }, 90_000);
});
