/**
 * The content security policy holds on every route of the app in Chromium (issue #7, access
 * control): each route of src/app/app.routes.ts and the features' *.routes.ts, loaded as a deep
 * link by the user it is for (public ones by a visitor, signed-in ones by the fitting demo user,
 * ids found through the API on the demo seed), renders its page with no `securitypolicyviolation`,
 * no uncaught page error and no request to a host other than 127.0.0.1. Findings are kept per
 * route, so a failure names the route. A last spec shows the policy is enforced on the app's own
 * pages (an inline script is refused and reported) beside what it allows (an inline style).
 */
import type { Page } from 'playwright-core';
import { DEMO, apiSignIn, e2e, freePort, linkIn, makeUser, newPage, signIn, startAppServer, uniqueEmail, type PageWatch } from '../support/e2e-env';

async function api<T>(path: string, token: string, method = 'GET', body?: unknown, base = e2e().baseUrl): Promise<{ status: number; body: T }> {
  const r = await fetch(base + path, {
    method,
    headers: { authorization: `Bearer ${token}`, ...(body ? { 'content-type': 'application/json' } : {}) },
    body: body ? JSON.stringify(body) : undefined,
  });
  const text = await r.text();
  return { status: r.status, body: (text ? JSON.parse(text) : null) as T };
}

interface Visit {
  path: string;
  /** Where the app lands when the route redirects (a guard, `/admin`), when not `path` itself. */
  landsOn?: string;
}

interface Finding {
  route: string;
  csp: string[];
  pageErrors: string[];
  foreign: string[];
}

/** Lengths of the watch's lists, to take what one visit added. */
const mark = (w: PageWatch) => ({ csp: w.csp.length, pageErrors: w.pageErrors.length, foreign: w.foreign.length });

/**
 * Loads each path as a deep link (a full page load), waits for its page heading and for the
 * network to settle, and returns what each visit added to the watch.
 */
async function sweep(page: Page, watch: PageWatch, visits: Visit[], base = e2e().baseUrl): Promise<Finding[]> {
  const findings: Finding[] = [];
  for (const v of visits) {
    const m = mark(watch);
    await page.goto(base + v.path);
    if (v.landsOn) await page.waitForURL(base + v.landsOn);
    else expect(new URL(page.url()).pathname).withContext(v.path).toBe(v.path.split('?')[0]);
    await expectAsync(page.locator('h1').first().waitFor()).withContext(`${v.path}: a page heading`).toBeResolved();
    // Data, lazy chunks and fonts arrive after the heading: let them land before reading the watch.
    await page.waitForLoadState('networkidle', { timeout: 10_000 }).catch(() => undefined);
    // A violation is reported through an exposed binding: give the last report a turn to arrive.
    await page.evaluate(() => new Promise((r) => setTimeout(r, 50)));
    findings.push({
      route: v.path,
      csp: watch.csp.slice(m.csp),
      pageErrors: watch.pageErrors.slice(m.pageErrors),
      foreign: watch.foreign.slice(m.foreign),
    });
  }
  return findings;
}

function expectClean(findings: Finding[], who: string): void {
  for (const f of findings) {
    expect(f.csp).withContext(`${who} ${f.route}: CSP violations`).toEqual([]);
    expect(f.pageErrors).withContext(`${who} ${f.route}: uncaught page errors`).toEqual([]);
    expect(f.foreign).withContext(`${who} ${f.route}: requests off 127.0.0.1`).toEqual([]);
  }
}

describe('The content security policy on every route of the app, in Chromium', () => {
  /** Every path visited, to check the sweep covered each route pattern of the route files. */
  const visited: string[] = [];
  const record = (findings: Finding[]) => visited.push(...findings.map((f) => f.route));

  it('holds on the public routes, as a visitor (mail-link pages with real tokens, sign-up while open, the public record of a label)', async () => {
    const admin = await apiSignIn(DEMO.admin);
    const tech = await apiSignIn(DEMO.tech);
    // Real tokens for the mail-link pages, from real mail.
    const invitee = uniqueEmail('csp-invitee');
    expect((await api('/api/admin/invitations', admin.accessToken, 'POST', { email: invitee, roles: ['student'] })).status).toBe(201);
    const invitationPath = linkIn(await e2e().mail.waitFor(invitee, /invited/)).pathname;
    const resetUser = await makeUser(['technician'], 'csp-sweep-password-1');
    const asked = await fetch(e2e().baseUrl + '/api/auth/password-reset', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: resetUser.email }) });
    expect(asked.status).toBe(202);
    const resetPath = linkIn(await e2e().mail.waitFor(resetUser.email, /reset/)).pathname;
    // The demo's provenance label (the museum's amplifier).
    const sets = await api<{ items: { id: number }[] }>('/api/sets?pageSize=50', tech.accessToken);
    let labelToken: string | null = null;
    for (const s of sets.body.items) {
      const labels = await api<{ token: string | null }[]>(`/api/sets/${s.id}/labels`, tech.accessToken);
      labelToken ??= labels.body.find((l) => l.token)?.token ?? null;
    }
    expect(labelToken).withContext('the demo seed has a live provenance label').not.toBeNull();
    // A class invitation's link (/join/:token), from real mail.
    const instructor = await apiSignIn(DEMO.instructor);
    const classes = await api<{ items: { id: number }[] }>('/api/classes', instructor.accessToken);
    const classInvitee = uniqueEmail('csp-class-invitee');
    expect((await api(`/api/classes/${classes.body.items[0].id}/invitations`, instructor.accessToken, 'POST', { emails: [classInvitee] })).status).toBe(201);
    const joinPath = linkIn(await e2e().mail.waitFor(classInvitee, /join the class/)).pathname;

    const { page, watch } = await newPage();
    const findings = await sweep(page, watch, [
      { path: '/' },
      { path: '/sign-in' },
      // Sign-up is closed by default: the guard sends a visitor to sign in.
      { path: '/sign-up', landsOn: '/sign-in' },
      { path: '/reset-password' },
      { path: resetPath },
      { path: invitationPath },
      { path: joinPath },
      { path: '/calc' },
      { path: `/p/${labelToken}` },
      { path: '/no/such/page' },
    ]);
    try {
      expect((await api('/api/admin/settings', admin.accessToken, 'PUT', { openSignUp: true })).status).toBe(200);
      findings.push(...(await sweep(page, watch, [{ path: '/sign-up' }])));
    } finally {
      await api('/api/admin/settings', admin.accessToken, 'PUT', { openSignUp: false });
    }
    record(findings);
    expect(findings.length).toBe(11);
    expectClean(findings, 'visitor');
  });

  it('holds on the admin pages, as the admin', async () => {
    const { page, watch } = await newPage();
    await signIn(page, DEMO.admin);
    const findings = await sweep(page, watch, [{ path: '/home' }, { path: '/admin', landsOn: '/admin/users' }, { path: '/admin/users' }, { path: '/admin/settings' }]);
    record(findings);
    expectClean(findings, 'admin');
  });

  it('holds on the template and tube-type pages, as the author (the editor and the version diff of an own template)', async () => {
    const author = await apiSignIn(DEMO.author);
    const list = await api<{ items: { id: number; own: boolean; versionCount: number; latestVersion: number }[] }>('/api/templates?pageSize=50', author.accessToken);
    const own = list.body.items.filter((t) => t.own);
    expect(own.length).withContext('the author owns demo templates').toBeGreaterThan(0);
    const t = own.find((x) => x.versionCount > 1) ?? own[0];
    const tubes = await api<{ items: { designation: string }[] }>('/api/tube-types', author.accessToken);
    const designation = tubes.body.items[0].designation;
    const from = Math.max(1, t.latestVersion - 1);

    const { page, watch } = await newPage();
    await signIn(page, DEMO.author);
    const findings = await sweep(page, watch, [
      { path: '/templates' },
      { path: '/templates/tube-types' },
      { path: '/templates/tube-types/new' },
      { path: `/templates/tube-types/${encodeURIComponent(designation)}` },
      { path: `/templates/${t.id}` },
      { path: `/templates/${t.id}/diff?from=${from}&to=${t.latestVersion}` },
      { path: `/templates/${t.id}/edit` },
    ]);
    record(findings);
    expectClean(findings, 'author');
  });

  it('holds on the set, survey and meter pages, as the technician (each demo set, its record, label and new-survey pages, each survey, each meter profile)', async () => {
    const tech = await apiSignIn(DEMO.tech);
    const sets = await api<{ items: { id: number }[] }>('/api/sets?pageSize=50', tech.accessToken);
    expect(sets.body.items.length).withContext('the demo technician has sets').toBeGreaterThanOrEqual(3);
    const surveyIds: number[] = [];
    for (const s of sets.body.items) {
      const one = await api<{ surveys: { id: number }[] }>(`/api/sets/${s.id}`, tech.accessToken);
      surveyIds.push(...one.body.surveys.map((x) => x.id));
    }
    expect(surveyIds.length).withContext('the demo sets have surveys').toBeGreaterThan(0);
    const meters = await api<{ items: { id: number }[] }>('/api/meter-profiles', tech.accessToken);
    expect(meters.body.items.length).withContext('the demo technician has meter profiles').toBeGreaterThan(0);

    const { page, watch } = await newPage();
    await signIn(page, DEMO.tech);
    const visits: Visit[] = [{ path: '/home' }, { path: '/sets' }, { path: '/sets/new' }];
    for (const s of sets.body.items) {
      visits.push({ path: `/sets/${s.id}` }, { path: `/sets/${s.id}/record` }, { path: `/sets/${s.id}/label` }, { path: `/sets/${s.id}/surveys/new` });
    }
    for (const id of surveyIds) visits.push({ path: `/surveys/${id}` });
    visits.push({ path: '/meters' }, { path: '/meters/new' });
    for (const m of meters.body.items) visits.push({ path: `/meters/${m.id}` });
    const findings = await sweep(page, watch, visits);
    record(findings);
    expect(findings.length).toBe(visits.length);
    expectClean(findings, 'technician');
  });

  it('holds on the label page with its QR code, on a server that knows its public address', async () => {
    const port = await freePort();
    const server = await startAppServer({ PUBLIC_BASE_URL: `http://127.0.0.1:${port}` }, port);
    try {
      const tech = await apiSignIn(DEMO.tech, undefined, server.url);
      const sets = await api<{ items: { id: number }[] }>('/api/sets?pageSize=50', tech.accessToken, 'GET', undefined, server.url);
      const { page, watch } = await newPage();
      await signIn(page, DEMO.tech, undefined, server.url);
      const findings = await sweep(
        page,
        watch,
        sets.body.items.map((s) => ({ path: `/sets/${s.id}/label` })),
        server.url,
      );
      expectClean(findings, 'technician (public address set)');
      // The label page of the set with the demo label drew its QR code there (a data: or blob: image).
      let labelled: number | undefined;
      for (const s of sets.body.items) {
        const labels = await api<{ token: string | null }[]>(`/api/sets/${s.id}/labels`, tech.accessToken, 'GET', undefined, server.url);
        if (labels.body.some((l) => l.token)) labelled ??= s.id;
      }
      expect(labelled).withContext('a demo set with a live label').toBeDefined();
      const m = mark(watch);
      await page.goto(`${server.url}/sets/${labelled}/label`);
      await expectAsync(page.getByRole('img', { name: 'QR code of the provenance link' }).first().waitFor()).toBeResolved();
      expect(watch.csp.slice(m.csp)).toEqual([]);
    } finally {
      await server.close();
    }
  });

  it('holds for the instructor and the student on the pages their menus offer, and the class pages', async () => {
    // The demo class: its assignments, an attempt of each, the student's own attempt.
    const si = await apiSignIn(DEMO.instructor);
    const ss = await apiSignIn(DEMO.student);
    const classId = (await api<{ items: { id: number }[] }>('/api/classes', si.accessToken)).body.items[0].id;
    const assignmentIds = (await api<{ assignments: { id: number }[] }>(`/api/classes/${classId}`, si.accessToken)).body.assignments.map((a) => a.id);
    const classVisits: Visit[] = [{ path: '/classes' }, { path: `/classes/${classId}` }];
    const studentVisits: Visit[] = [{ path: '/classes' }, { path: `/classes/${classId}` }, { path: '/competencies' }];
    for (const id of assignmentIds) {
      const queue = (await api<{ queue: { latestAttempt: { id: number } | null }[] }>(`/api/assignments/${id}`, si.accessToken)).body.queue;
      classVisits.push({ path: `/assignments/${id}` });
      const attempt = queue.find((q) => q.latestAttempt)?.latestAttempt;
      if (attempt) classVisits.push({ path: `/attempts/${attempt.id}/review` });
      const mine = (await api<{ myAttempts: { id: number }[] }>(`/api/assignments/${id}`, ss.accessToken)).body.myAttempts;
      studentVisits.push({ path: `/assignments/${id}` });
      if (mine.length) studentVisits.push({ path: `/attempts/${mine[0].id}/review` });
    }
    const instructor = await newPage();
    await signIn(instructor.page, DEMO.instructor);
    const fi = await sweep(instructor.page, instructor.watch, [{ path: '/home' }, { path: '/sets' }, { path: '/templates' }, { path: '/meters' }, { path: '/calc' }, ...classVisits]);
    record(fi);
    expectClean(fi, 'instructor');
    const student = await newPage();
    await signIn(student.page, DEMO.student);
    const fs = await sweep(student.page, student.watch, [{ path: '/home' }, { path: '/templates' }, { path: '/templates/tube-types' }, { path: '/sets' }, { path: '/calc' }, ...studentVisits]);
    record(fs);
    expectClean(fs, 'student');
  });

  it('covered every route pattern of the route files', () => {
    // The route patterns of src/app/app.routes.ts and the features' *.routes.ts, written out by hand.
    const patterns: RegExp[] = [
      /^\/$/,
      /^\/sign-in$/,
      /^\/sign-up$/,
      /^\/reset-password$/,
      /^\/reset-password\/[^/]+$/,
      /^\/invitation\/[^/]+$/,
      /^\/home$/,
      /^\/admin$/,
      /^\/admin\/users$/,
      /^\/admin\/settings$/,
      /^\/templates$/,
      /^\/templates\/tube-types$/,
      /^\/templates\/tube-types\/new$/,
      /^\/templates\/tube-types\/(?!new$)[^/]+$/,
      /^\/templates\/\d+$/,
      /^\/templates\/\d+\/diff(\?.*)?$/,
      /^\/templates\/\d+\/edit$/,
      /^\/sets$/,
      /^\/sets\/new$/,
      /^\/sets\/\d+$/,
      /^\/sets\/\d+\/surveys\/new$/,
      /^\/sets\/\d+\/record$/,
      /^\/sets\/\d+\/label$/,
      /^\/surveys\/\d+$/,
      /^\/meters$/,
      /^\/meters\/new$/,
      /^\/meters\/\d+$/,
      /^\/p\/[^/]+$/,
      /^\/calc$/,
      /^\/classes$/,
      /^\/classes\/\d+$/,
      /^\/assignments\/\d+$/,
      /^\/attempts\/\d+\/review$/,
      /^\/join\/[^/]+$/,
      /^\/competencies$/,
      /^\/no\/such\/page$/, // '**'
    ];
    const missing = patterns.filter((p) => !visited.some((v) => p.test(v))).map(String);
    expect(missing).toEqual([]);
  });

  it("is enforced on the app's own pages: an inline script is refused and reported, while an inline style (allowed) is not", async () => {
    const { page, watch } = await newPage();
    await page.goto(e2e().baseUrl + '/calc');
    await page.locator('h1').first().waitFor();
    // The twin first: an inline style attribute and <style> element are allowed ('unsafe-inline' for styles).
    await page.evaluate(() => {
      const s = document.createElement('style');
      s.textContent = 'h1 { letter-spacing: 0.01em; }';
      document.head.append(s);
      document.querySelector('h1')!.setAttribute('style', 'outline: 1px dotted');
    });
    await page.evaluate(() => new Promise((r) => setTimeout(r, 100)));
    expect(watch.csp).toEqual([]);
    // An injected inline script does not run, and the violation is reported.
    const ran = await page.evaluate(() => {
      const s = document.createElement('script');
      s.textContent = 'window.__ran = true;';
      document.body.append(s);
      return (window as unknown as { __ran?: boolean }).__ran === true;
    });
    expect(ran).toBeFalse();
    await expectAsync(waitUntil(() => watch.csp.length > 0)).toBeResolved();
    expect(watch.csp[0]).toMatch(/^script-src(-elem)? inline/);
  });
});

async function waitUntil(test: () => boolean, ms = 5000): Promise<void> {
  const end = Date.now() + ms;
  while (!test()) {
    if (Date.now() > end) throw new Error('condition not met in time');
    await new Promise((r) => setTimeout(r, 50));
  }
}
