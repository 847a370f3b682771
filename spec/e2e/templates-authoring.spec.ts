/**
 * Chassis templates in the browser, the author's side: a template made from the library's "New
 * template" dialog, laid out in the draft editor (stage, socket whose tube type fills its pins,
 * two components with nominals typed as text, a component check for each), saved with Ctrl+S
 * with the in-circuit expectation shown, published, edited, published again, compared and the
 * first version retired; and two editor pages on one draft, where the second save is refused
 * with both revisions named and the latest is reloaded. Every page stays on 127.0.0.1, with no
 * console error, no uncaught error and no CSP violation.
 */
import { randomBytes } from 'node:crypto';
import type { Locator, Page } from 'playwright-core';
import { DEMO, apiSignIn, e2e, newContext, newPage, signIn, type PageWatch } from '../support/e2e-env';

async function api(path: string, token: string, method = 'GET', body?: unknown): Promise<Response> {
  return fetch(e2e().baseUrl + path, {
    method,
    headers: { authorization: `Bearer ${token}`, ...(body !== undefined ? { 'content-type': 'application/json' } : {}) },
    body: body !== undefined ? JSON.stringify(body) : undefined,
  });
}

/** As in templates-library.spec.ts: clean, but for the refusals the spec provokes on purpose. */
function expectClean(watch: PageWatch, who: string, expected: RegExp[] = []): void {
  const unexpected = (line: string) => !expected.some((e) => e.test(line));
  expect(watch.foreign).withContext(`${who}: requests off 127.0.0.1`).toEqual([]);
  const provoked = watch.failures.filter((f) => !unexpected(f)).map((f) => f.split(' ')[0]);
  expect(watch.consoleErrors.filter((e) => !provoked.some((s) => e.includes(`status of ${s}`)))).withContext(`${who}: console errors`).toEqual([]);
  expect(watch.pageErrors).withContext(`${who}: uncaught errors`).toEqual([]);
  expect(watch.csp).withContext(`${who}: CSP violations`).toEqual([]);
  expect(watch.failures.filter(unexpected)).withContext(`${who}: failed requests`).toEqual([]);
}

const meta = (page: Page): Locator => page.locator('.editor p.meta');

/** Ctrl+S, then the editor says the draft is saved (and at which revision). */
async function saveWithKeys(page: Page): Promise<number> {
  await page.keyboard.press('Control+s');
  const saved = page.getByText(/^Saved as revision \d+\.$/).first();
  await saved.waitFor();
  await meta(page).filter({ hasText: 'all saved' }).waitFor();
  return Number(/revision (\d+)/.exec((await saved.textContent())!)![1]);
}

/** Fills a component's form field and leaves it (Tab closes the node autocomplete). */
async function fillField(form: Locator, label: string, value: string): Promise<void> {
  const box = form.getByRole('textbox', { name: label, exact: true }).or(form.getByRole('combobox', { name: label, exact: true }));
  await box.fill(value);
  await box.press('Tab');
}

async function addComponent(page: Page, ref: string, a: string, b: string, nominal: string): Promise<void> {
  await page.getByRole('button', { name: 'Add a component' }).click();
  const form = page.getByRole('form', { name: `Component ${ref}` });
  await form.waitFor();
  await fillField(form, 'Node a', a);
  await fillField(form, 'Node b', b);
  await fillField(form, 'Nominal', nominal);
  await form.getByRole('button', { name: 'Done' }).click();
  await form.waitFor({ state: 'detached' });
}

/** The test-point row of a component check, by the component's reference. */
const checkRow = (page: Page, ref: string): Locator => page.getByRole('list', { name: 'Test points in bench order' }).locator('li.point').filter({ has: page.locator('strong.name', { hasText: `${ref} check` }) });

describe('Chassis templates: the author', () => {
  it('creates a template from the library, lays it out in the editor, publishes two versions, compares them and retires the first', async () => {
    const maker = `Ashgrove ${randomBytes(3).toString('hex')}`;
    const { page, watch } = await newPage();
    await signIn(page, DEMO.author);
    await page.goto(e2e().baseUrl + '/templates');
    await page.getByRole('button', { name: 'New template' }).click();
    const dialog = page.getByRole('dialog', { name: 'New template' });
    // Refused first: without a model nothing is created and the field says why.
    await dialog.getByRole('textbox', { name: 'Maker' }).fill(maker);
    await dialog.getByRole('button', { name: 'Create and edit' }).click();
    await dialog.getByText('Enter the model.').waitFor();
    expect(page.url()).toMatch(/\/templates$/);
    await dialog.getByRole('textbox', { name: 'Model' }).fill('AG-1');
    await dialog.getByRole('button', { name: 'Create and edit' }).click();
    await page.waitForURL(/\/templates\/\d+\/edit$/);
    const id = Number(/\/templates\/(\d+)\/edit$/.exec(page.url())![1]);
    await meta(page).filter({ hasText: /Draft · revision \d+/ }).waitFor();

    // A stage, a socket whose tube type fills its pins.
    await page.getByRole('button', { name: 'Add a stage' }).click();
    await page.getByRole('button', { name: 'Add a socket' }).click();
    const tubeType = page.getByRole('combobox', { name: 'Tube type' });
    await tubeType.fill('12AX7');
    await page.getByRole('option', { name: /^12AX7 / }).click();
    const pins = page.locator('dm-socket-panel table.list tbody tr');
    await pins.first().waitFor();
    expect(await pins.count()).toBe(9); // a noval base: nine pins
    expect(await page.getByText(/12AX7: noval base/).count()).toBe(1);

    // Back to the stage: two components with nominals typed as text, a check for each.
    await page.getByRole('navigation', { name: 'Template outline' }).getByRole('button', { name: /^1\. New stage/ }).click();
    await addComponent(page, 'R1', 'V1.1', 'B+', '470k');
    await addComponent(page, 'R2', 'V1.3', 'chassis', '4K7');
    expect((await page.locator('tr[data-ref="R1"] td.nominal').textContent())!).toContain('470 kΩ');
    expect((await page.locator('tr[data-ref="R2"] td.nominal').textContent())!).toContain('4.7 kΩ');
    await page.getByRole('button', { name: 'Create component checks for every component' }).click();
    await page.getByText('2 component checks created; 0 components skipped (already checked, or wires).').first().waitFor();
    const revision1 = await saveWithKeys(page);
    expect(revision1).toBeGreaterThan(1);
    // The in-circuit expectation computed from the network, beside the nominal.
    expect((await checkRow(page, 'R1').locator('.in-circuit').textContent())!.trim()).toBe('470 kΩ');
    expect((await checkRow(page, 'R2').locator('.in-circuit').textContent())!.trim()).toBe('4.7 kΩ');
    const draft = (await (await api(`/api/templates/${id}/draft`, (await apiSignIn(DEMO.author)).accessToken)).json()) as {
      revision: number;
      content: { components: { ref: string; nominal: { ohms?: number } }[]; testPoints: unknown[] };
    };
    expect(draft.revision).toBe(revision1);
    expect(draft.content.components.map((c) => [c.ref, c.nominal.ohms])).toEqual([
      ['R1', 470_000],
      ['R2', 4_700],
    ]);
    expect(draft.content.testPoints.length).toBe(2);

    // Publish version 1 from the template page.
    await page.goto(`${e2e().baseUrl}/templates/${id}`);
    await page.getByRole('heading', { level: 1, name: `${maker} AG-1` }).waitFor();
    const publish = async (changelog: string, n: number) => {
      await page.getByRole('button', { name: 'Publish' }).click();
      const d = page.getByRole('dialog');
      await d.getByRole('textbox', { name: 'Changelog' }).fill(changelog);
      await d.getByRole('button', { name: 'Publish' }).click();
      await page.getByText(`Published as version ${n}.`).waitFor();
    };
    await publish('First issue, from the service sheet', 1);
    const versions = page.locator('section[aria-labelledby="versions-title"] li.version');
    await versions.filter({ hasText: 'Version 1' }).filter({ hasText: 'First issue, from the service sheet' }).waitFor();

    // Edit the draft again: R2 becomes 5K6, then version 2.
    await page.getByRole('link', { name: 'Edit draft' }).click();
    await page.waitForURL(/\/edit$/);
    await meta(page).filter({ hasText: 'starts from version 1' }).waitFor();
    await page.getByRole('navigation', { name: 'Template outline' }).getByRole('button', { name: /^1\. New stage/ }).click();
    await page.getByRole('button', { name: 'Edit R2', exact: true }).click();
    const r2 = page.getByRole('form', { name: 'Component R2' });
    await fillField(r2, 'Nominal', '5K6');
    await r2.getByRole('button', { name: 'Done' }).click();
    expect((await page.locator('tr[data-ref="R2"] td.nominal').textContent())!).toContain('5.6 kΩ');
    await saveWithKeys(page);
    expect((await checkRow(page, 'R2').locator('.in-circuit').textContent())!.trim()).toBe('5.6 kΩ');
    await page.goto(`${e2e().baseUrl}/templates/${id}`);
    await page.getByRole('heading', { level: 1, name: `${maker} AG-1` }).waitFor();
    await publish('R2 value from the corrected parts list', 2);

    // The diff from 1 to 2 names R2 and its changed nominal in words; R1 is not listed.
    await page.getByRole('link', { name: 'Changes from version 1 to 2' }).click();
    await page.waitForURL(/\/diff\?/);
    await page.getByRole('heading', { level: 1, name: /^Changes/ }).waitFor();
    const components = page.locator('section[aria-labelledby="co-title"]');
    const changed = components.locator('li.row[data-change="changed"]');
    await changed.first().waitFor();
    expect(await changed.count()).toBe(1);
    expect((await changed.locator('strong').first().textContent())!).toContain('R2');
    const fields = (await changed.locator('ul.fields li').allTextContents()).map((s) => s.replace(/\s+/g, ' ').trim());
    expect(fields).toEqual(['nominal: 4.7 kΩ (4K7) → 5.6 kΩ (5K6)']); // the value and the letter code as typed
    expect(await components.locator('li.row').filter({ hasText: 'R1' }).count()).toBe(0);

    // Retire version 1: it says so, with the reason; version 2 stays published.
    await page.goto(`${e2e().baseUrl}/templates/${id}`);
    await page.getByRole('heading', { level: 1, name: `${maker} AG-1` }).waitFor();
    await page.getByRole('button', { name: 'Retire version 1' }).click();
    const retire = page.getByRole('dialog', { name: 'Retire version 1' });
    await retire.getByRole('textbox', { name: 'Reason' }).fill('Superseded: wrong R2 value');
    await retire.getByRole('button', { name: 'Retire' }).click();
    await page.getByText('Version 1 is retired.').waitFor();
    const version = (n: number) => versions.filter({ has: page.locator('strong', { hasText: new RegExp(`^Version ${n}$`) }) });
    const v1 = version(1);
    await v1.filter({ hasText: 'Superseded: wrong R2 value' }).waitFor();
    expect((await v1.locator('.state').textContent())!).toContain('retired');
    expect((await version(2).locator('.state').textContent())!).toContain('published');
    expect(await page.getByRole('button', { name: 'Retire version 1' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Retire version 2' }).count()).toBe(1);
    expectClean(watch, 'author authoring');
  }, 150_000);

  it('refuses a stale save from a second editor page with both revisions named, and reloads the latest revision', async () => {
    const token = (await apiSignIn(DEMO.author)).accessToken;
    const created = await api('/api/templates', token, 'POST', { chassis: { maker: `Twinpage ${randomBytes(3).toString('hex')}`, model: 'T-2', kind: 'amplifier', power: 'transformer' } });
    expect(created.status).toBe(201);
    const { id } = (await created.json()) as { id: number };
    const { context, watch } = await newContext();
    const one = await context.newPage();
    await signIn(one, DEMO.author);
    const two = await context.newPage();
    for (const p of [one, two]) {
      await p.goto(`${e2e().baseUrl}/templates/${id}/edit`);
      await meta(p).filter({ hasText: 'all saved' }).waitFor();
    }
    const start = Number(/revision (\d+)/.exec((await meta(one).textContent())!)![1]);
    expect((await meta(two).textContent())!).toContain(`revision ${start}`);

    // The first page saves: the draft moves on.
    await one.bringToFront();
    await one.getByRole('button', { name: 'Add a stage' }).click();
    const saved = await saveWithKeys(one);
    expect(saved).toBe(start + 1);

    // The second page, still on the old revision, saves: refused, both revisions named.
    await two.bringToFront();
    await two.getByRole('button', { name: 'Add a stage' }).click();
    await two.getByRole('button', { name: 'Add a stage' }).click();
    await two.keyboard.press('Control+s');
    const conflict = two.getByRole('alert', { name: 'Save conflict' });
    await conflict.waitFor();
    const text = (await conflict.textContent())!.replace(/\s+/g, ' ');
    expect(text).toContain(`This page has revision ${start}`);
    expect(text).toContain(`the server has revision ${saved}`);
    const draft = (await (await api(`/api/templates/${id}/draft`, token)).json()) as { revision: number; content: { stages: unknown[] } };
    expect(draft.revision).toBe(saved); // nothing of the second page was written
    expect(draft.content.stages.length).toBe(1);

    // Reloading the latest revision: the page shows the server's draft, one stage.
    await conflict.getByRole('button', { name: `Reload revision ${saved} (keep mine to restore)` }).click();
    await conflict.waitFor({ state: 'detached' });
    await meta(two).filter({ hasText: `revision ${saved}` }).waitFor();
    const stages = two.getByRole('navigation', { name: 'Template outline' }).getByRole('button', { name: /^\d+\. New stage/ });
    expect(await stages.count()).toBe(1);
    expectClean(watch, 'two editor pages', [new RegExp(`^409 PUT .*/api/templates/${id}/draft$`)]);
  }, 90_000);
});
