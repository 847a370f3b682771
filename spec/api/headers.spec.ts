/**
 * Security headers on every route of the route table (issue #7, access control): helmet's headers
 * with the content security policy decided in DEVELOPERS.md ("Content security policy"), written
 * out here by hand; no `X-Powered-By`; and CORS closed — neither a cross-origin preflight nor a
 * request carrying an Origin gets an `Access-Control-Allow-Origin`. Each route is asked plainly
 * (no token) and again as a signed-in admin with ids that exist nowhere (so nothing is changed).
 * Served upload bytes carry their own stricter policy (spec/api/files.spec.ts, set-files.spec.ts).
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import express from 'express';
import request from 'supertest';
import type { RouteDef } from '../../api/http/route-table';
import { apiEnv, bearer, userSession, type Session } from '../support/api-env';

type App = Parameters<typeof request>[0];

/** The policy of DEVELOPERS.md, directive by directive (helmet joins them with ';'). */
const EXPECTED_CSP = [
  "default-src 'self'",
  "script-src 'self'",
  "style-src 'self' 'unsafe-inline'",
  "img-src 'self' data: blob:",
  "font-src 'self'",
  "connect-src 'self'",
  "worker-src 'self'",
  "frame-src 'self' blob:",
  "manifest-src 'self'",
  "object-src 'none'",
  "base-uri 'self'",
  "frame-ancestors 'none'",
  "form-action 'self'",
];

/** helmet's other headers as this app configures it (helmet 8 defaults; HSTS only with TLS). */
const EXPECTED_HEADERS: Record<string, string> = {
  'x-content-type-options': 'nosniff',
  // The legacy twin of frame-ancestors for old browsers.
  'x-frame-options': 'SAMEORIGIN',
  'cross-origin-opener-policy': 'same-origin',
  'cross-origin-resource-policy': 'same-origin',
  'referrer-policy': 'no-referrer',
  'x-dns-prefetch-control': 'off',
  'x-permitted-cross-domain-policies': 'none',
  'x-xss-protection': '0',
};

const directives = (csp: string | undefined) => (csp ?? '').split(';').map((d) => d.trim()).filter(Boolean);

/** What is wrong with one answer's security headers ([] when nothing). */
function headerProblems(h: Record<string, string | undefined>, opts: { tls?: boolean } = {}): string[] {
  const problems: string[] = [];
  const want = opts.tls ? [...EXPECTED_CSP, 'upgrade-insecure-requests'] : EXPECTED_CSP;
  const got = directives(h['content-security-policy']);
  if (JSON.stringify([...got].sort()) !== JSON.stringify([...want].sort())) problems.push(`content-security-policy: ${h['content-security-policy']}`);
  for (const [name, value] of Object.entries(EXPECTED_HEADERS)) if (h[name] !== value) problems.push(`${name}: ${h[name]}`);
  if (h['x-powered-by'] !== undefined) problems.push(`x-powered-by: ${h['x-powered-by']}`);
  const hsts = h['strict-transport-security'];
  if (opts.tls ? hsts !== 'max-age=15552000; includeSubDomains' : hsts !== undefined) problems.push(`strict-transport-security: ${hsts}`);
  return problems;
}

/** The CORS headers an answer carries (none, when CORS is closed). */
const corsHeaders = (h: Record<string, string | undefined>) => Object.keys(h).filter((k) => k.startsWith('access-control-'));

/** A value for each path parameter of the route table: ids that exist nowhere, well-formed keys. */
const PARAM_VALUES: Record<string, string> = {
  id: '2147480001',
  userId: '2147480001',
  fileId: '2147480001',
  version: '2147480001',
  number: '2147480001',
  correctionId: '2147480001',
  readingId: '2147480001',
  leadId: '2147480001',
  labelId: '2147480001',
  invitationId: '2147480001',
  studentId: '2147480001',
  commentId: '2147480001',
  designation: 'NOSUCH9',
  token: 'nosuchtokennosuchtokennosuchtoken',
  socketKey: 'so-nosuch',
  itemKey: 'nosuch-item',
  componentKey: 'c-nosuch',
};

function concretePath(path: string): string {
  return path.replace(/:([A-Za-z]+)/g, (_m, name: string) => {
    const v = PARAM_VALUES[name];
    if (v === undefined) throw new Error(`headers.spec: no value for the path parameter :${name} (${path}) — add one to PARAM_VALUES`);
    return v;
  });
}

/** The route as a plain request: no body for GET and DELETE, an empty JSON object otherwise. */
function plain(app: App, r: RouteDef, headers: Record<string, string> = {}) {
  const req = request(app)[r.method](concretePath(r.path)).set(headers);
  return r.method === 'get' || r.method === 'delete' ? req : req.send({});
}

const label = (r: RouteDef) => `${r.method.toUpperCase()} ${r.path}`;
const ELSEWHERE = 'http://elsewhere.example';

describe('Security headers and CORS on every route', () => {
  let routes: readonly RouteDef[];
  let admin: Session;

  beforeAll(async () => {
    const env = await apiEnv();
    routes = env.app.routeTable;
    admin = await userSession(['admin']);
  });

  it('has a route table to sweep, every path parameter of it known here', () => {
    expect(routes.length).toBeGreaterThan(90);
    for (const r of routes) expect(() => concretePath(r.path)).withContext(label(r)).not.toThrow();
  });

  it("answers every route's plain request (no token) with helmet's headers and the decided policy, without X-Powered-By or a 5xx", async () => {
    const env = await apiEnv();
    const statuses = new Set<number>();
    for (const r of routes) {
      const res = await plain(env.app, r);
      statuses.add(res.status);
      expect(res.status).withContext(label(r)).toBeLessThan(500);
      expect(headerProblems(res.headers)).withContext(label(r)).toEqual([]);
    }
    // The sweep met successes and refusals alike (public reads 200, validation 400, guards 401).
    for (const s of [200, 400, 401]) expect(statuses.has(s)).withContext(`status ${s} among ${[...statuses]}`).toBeTrue();
  });

  it('answers every route as a signed-in admin (objects that do not exist) with the same headers, without a 5xx', async () => {
    const env = await apiEnv();
    const statuses = new Set<number>();
    for (const r of routes) {
      const res = await plain(env.app, r, bearer(admin));
      statuses.add(res.status);
      expect(res.status).withContext(label(r)).toBeLessThan(500);
      expect(headerProblems(res.headers)).withContext(label(r)).toEqual([]);
    }
    for (const s of [200, 400, 404]) expect(statuses.has(s)).withContext(`status ${s} among ${[...statuses]}`).toBeTrue();
  });

  it('sends the same headers outside the route table: the app shell, an unknown API route, an unknown file', async () => {
    const env = await apiEnv();
    const shell = await request(env.app).get('/sets/1/record').set('Accept', 'text/html');
    expect(shell.status).toBe(200);
    expect(shell.text).toContain('<app-root>');
    const unknownApi = await request(env.app).get('/api/no-such-route');
    expect(unknownApi.status).toBe(404);
    const unknownFile = await request(env.app).get('/no-such.png').set('Accept', 'image/png');
    expect(unknownFile.status).toBe(404);
    for (const [name, res] of [['shell', shell], ['unknown API', unknownApi], ['unknown file', unknownFile]] as const) {
      expect(headerProblems(res.headers)).withContext(name).toEqual([]);
    }
  });

  it('adds HSTS and upgrade-insecure-requests only when the process serves TLS', async () => {
    const env = await apiEnv();
    // loadConfig only checks that the files exist; createApp never reads them (the server does).
    const dir = mkdtempSync(join(tmpdir(), 'driftmark-headers-tls-'));
    writeFileSync(join(dir, 'cert.pem'), 'not read by createApp');
    writeFileSync(join(dir, 'key.pem'), 'not read by createApp');
    const tlsApp = env.appWith({ TLS_CERT: join(dir, 'cert.pem'), TLS_KEY: join(dir, 'key.pem') });
    const overTls = await request(tlsApp).get('/api/health');
    expect(headerProblems(overTls.headers, { tls: true })).toEqual([]);
    expect(overTls.headers['strict-transport-security']).toBe('max-age=15552000; includeSubDomains');
    // The twin: plain http sends neither (HSTS over http would be ignored, and would lock a LAN out).
    const plainHttp = await request(env.app).get('/api/health');
    expect(plainHttp.headers['strict-transport-security']).toBeUndefined();
    expect(directives(plainHttp.headers['content-security-policy'])).not.toContain('upgrade-insecure-requests');
  });

  it('keeps CORS closed on every route: a cross-origin preflight and a request with an Origin get no Access-Control-* header', async () => {
    const env = await apiEnv();
    for (const r of routes) {
      const path = concretePath(r.path);
      const preflight = await request(env.app)
        .options(path)
        .set('Origin', ELSEWHERE)
        .set('Access-Control-Request-Method', r.method.toUpperCase())
        .set('Access-Control-Request-Headers', 'authorization, content-type');
      expect(corsHeaders(preflight.headers)).withContext(`preflight ${label(r)}`).toEqual([]);
      expect(preflight.status).withContext(`preflight ${label(r)}`).toBeLessThan(500);

      for (const origin of [ELSEWHERE, 'null']) {
        const withOrigin = await plain(env.app, r, { Origin: origin, ...bearer(admin) });
        expect(corsHeaders(withOrigin.headers)).withContext(`${origin} ${label(r)}`).toEqual([]);
        expect(withOrigin.status).withContext(`${origin} ${label(r)}`).toBeLessThan(500);
      }
    }
  });

  it('answers a request with a foreign Origin exactly as without one — closed by missing headers, not by refusing — with no CORS header either way', async () => {
    const env = await apiEnv();
    const me = await request(env.app).get('/api/me').set(bearer(admin));
    const meElsewhere = await request(env.app).get('/api/me').set(bearer(admin)).set('Origin', ELSEWHERE);
    expect(me.status).toBe(200);
    expect(meElsewhere.status).toBe(200);
    expect(meElsewhere.body).toEqual(me.body);
    expect(corsHeaders(me.headers)).toEqual([]);
    expect(corsHeaders(meElsewhere.headers)).toEqual([]);
    // Credentials are never invited from elsewhere, also on a public route answering 200.
    const health = await request(env.app).get('/api/health').set('Origin', ELSEWHERE);
    expect(health.status).toBe(200);
    expect(health.headers['access-control-allow-credentials']).toBeUndefined();
    expect(health.headers['access-control-allow-origin']).toBeUndefined();
  });

  it('has checks that do catch an open CORS answer and a missing policy (an app made here that sends them)', async () => {
    const open = express();
    open.get('/x', (_req, res) => {
      res.set('Access-Control-Allow-Origin', '*').set('X-Powered-By', 'Express').json({});
    });
    const res = await request(open).get('/x').set('Origin', ELSEWHERE);
    expect(corsHeaders(res.headers)).toEqual(['access-control-allow-origin']);
    const problems = headerProblems(res.headers);
    expect(problems.some((p) => p.startsWith('content-security-policy'))).toBeTrue();
    expect(problems.some((p) => p.startsWith('x-content-type-options'))).toBeTrue();
    expect(problems).toContain('x-powered-by: Express');
  });
});
