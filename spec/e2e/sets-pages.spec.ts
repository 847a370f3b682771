/**
 * The set pages end to end on the demo sets (issue #5): the list, a set's gates and lifted leads,
 * the history chart drawn from its lazy chunk, the printable record (print media: no navigation),
 * and the provenance label — refused while PUBLIC_BASE_URL is unset, and with it set, a QR code
 * whose public page shows the chassis but no owner identity.
 */
import type { RunningServer } from '../../api/server';
import { apiSignIn, DEMO, newContext, signIn, startAppServer, url } from '../support/e2e-env';

async function setIdOf(base: string, label: string): Promise<number> {
  const s = await apiSignIn(DEMO.tech, undefined, base);
  const r = await fetch(`${base}/api/sets?q=${encodeURIComponent(label)}`, { headers: { authorization: `Bearer ${s.accessToken}` } });
  const body = (await r.json()) as { items: { id: number; label: string }[] };
  const found = body.items.find((x) => x.label === label);
  if (!found) throw new Error(`no demo set ${label}`);
  return found.id;
}

describe('The set pages', () => {
  it('lists the demo sets and shows a set’s gates, its open lifted lead and a history chart', async () => {
    const { context, watch } = await newContext();
    const page = await context.newPage();
    await signIn(page, DEMO.tech);
    await page.goto(url('/sets'));
    for (const label of ['Holloway collection', 'Job 2611 — R. Anselm', 'Vellmar Museum of Sound']) await page.getByText(label, { exact: true }).first().waitFor();

    await page.getByText('Vellmar Museum of Sound', { exact: true }).first().click();
    await page.getByRole('heading', { level: 1, name: 'Vellmar Museum of Sound' }).waitFor();
    await page.getByRole('tab', { name: 'Safety gates' }).click();
    await page.locator('li.gate .state', { hasText: 'Signed' }).first().waitFor();
    expect(await page.locator('li.gate .state.open').count()).toBe(0);
    expect(await page.locator('li.gate').count()).toBeGreaterThan(4);

    await page.goto(url(`/sets/${await setIdOf(url(''), 'Job 2611 — R. Anselm')}`));
    await page.getByRole('tab', { name: 'Lifted leads (1 open)' }).click();
    await page.getByText('R3').first().waitFor();

    await page.goto(url(`/sets/${await setIdOf(url(''), 'Holloway collection')}`));
    await page.getByRole('tab', { name: 'History' }).click();
    await page.locator('canvas').first().waitFor();
    expect(watch.pageErrors).toEqual([]);
    expect(watch.csp).toEqual([]);
  });

  it('prints the record without the navigation', async () => {
    const { context } = await newContext();
    const page = await context.newPage();
    await signIn(page, DEMO.tech);
    await page.goto(url(`/sets/${await setIdOf(url(''), 'Vellmar Museum of Sound')}/record`));
    await page.getByRole('heading', { level: 1, name: 'Record of Vellmar Museum of Sound' }).waitFor();
    await page.getByRole('heading', { level: 2, name: 'Parts record' }).waitFor();
    const nav = page.getByRole('navigation', { name: 'Main' });
    expect(await nav.isVisible()).toBeTrue();
    await page.emulateMedia({ media: 'print' });
    expect(await nav.isVisible()).toBeFalse();
    expect(await page.getByRole('heading', { level: 2, name: 'Safety gates' }).isVisible()).toBeTrue();
  });

  it('refuses a label while PUBLIC_BASE_URL is unset; with it, the QR code opens a public page without the owner', async () => {
    const { context } = await newContext();
    const page = await context.newPage();
    await signIn(page, DEMO.tech);
    const museum = await setIdOf(url(''), 'Vellmar Museum of Sound');
    await page.goto(url(`/sets/${museum}/label`));
    await page.getByRole('heading', { level: 1, name: 'Provenance label' }).waitFor();
    await page.getByText(/PUBLIC_BASE_URL/).first().waitFor();
    expect(await page.getByRole('img', { name: 'QR code of the provenance link' }).count()).toBe(0);

    let server: RunningServer | null = null;
    try {
      server = await startAppServer({ PUBLIC_BASE_URL: 'http://127.0.0.1:1' });
      const base = server.url;
      const p2 = await context.newPage();
      await signIn(p2, DEMO.tech, undefined, base);
      await p2.goto(`${base}/sets/${museum}/label`);
      await p2.getByRole('heading', { level: 1, name: 'Provenance label' }).waitFor();
      // The demo label exists; its QR code shows.
      await p2.getByRole('img', { name: 'QR code of the provenance link' }).first().waitFor();
      const s = await apiSignIn(DEMO.tech, undefined, base);
      const labels = (await (await fetch(`${base}/api/sets/${museum}/labels`, { headers: { authorization: `Bearer ${s.accessToken}` } })).json()) as { token: string | null }[] | { items: { token: string | null }[] };
      const token = (Array.isArray(labels) ? labels : labels.items).find((l) => l.token)!.token!;
      const visitor = await (await newContext()).context.newPage();
      await visitor.goto(`${base}/p/${token}`);
      await visitor.getByRole('heading', { level: 1, name: /QA-10/ }).waitFor();
      const text = await visitor.locator('main').innerText();
      expect(text).not.toContain('Vellmar');
      expect(text).not.toContain('Carmen');
      expect(text).toContain('QA10-2207');
    } finally {
      await server?.close();
    }
  });
});
