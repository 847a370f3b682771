/**
 * The API specs' shared environment: the real app (createApp) on the test cluster's database
 * (DATABASE_URL, set by `npm test`), a real pg-boss mail queue and the in-process mail fake.
 * Specs own their rows: every user they make has a unique e-mail.
 */
import { randomBytes } from 'node:crypto';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import bcrypt from 'bcrypt';
import supertest from 'supertest';
import { createApp } from '../../api/app';
import { loadConfig, type AppConfig } from '../../api/config';
import { createDatabase, type Database } from '../../api/db';
import { startMailFake, type MailFake } from '../../api/mail/mail-fake';
import { startMailQueue, type MailQueue } from '../../api/mail/outbox';
import { users, type Role } from '../../schema/index';

export interface ApiEnv {
  app: ReturnType<typeof createApp>;
  config: AppConfig;
  database: Database;
  mail: MailFake;
  queue: MailQueue;
  databaseUrl: string;
  /** Another app on the same database and services with other settings. */
  appWith(env: NodeJS.ProcessEnv): ReturnType<typeof createApp>;
}

export const TEST_ENV: NodeJS.ProcessEnv = {
  NODE_ENV: 'test',
  BCRYPT_COST: '10',
  TRUST_PROXY: 'loopback',
  SIGN_IN_SLOW_STEP_MS: '0',
  SIGN_IN_IP_LIMIT: '20',
  SIGN_IN_ACCOUNT_LIMIT: '5',
  PUBLIC_BASE_URL: 'http://driftmark.test',
};

let envPromise: Promise<ApiEnv> | null = null;

export function testConfig(extra: NodeJS.ProcessEnv = {}): AppConfig {
  const dataDir = mkdtempSync(join(tmpdir(), 'driftmark-spec-data-'));
  const dist = mkdtempSync(join(tmpdir(), 'driftmark-spec-dist-'));
  writeFileSync(join(dist, 'index.html'), '<!doctype html><title>Driftmark</title><app-root></app-root>');
  return loadConfig({ ...TEST_ENV, ...extra }, { dataDir, appDistDir: dist });
}

export function apiEnv(): Promise<ApiEnv> {
  envPromise ??= (async () => {
    const databaseUrl = process.env.DATABASE_URL;
    if (!databaseUrl) throw new Error('DATABASE_URL is not set: run the API specs through `npm test -- api`.');
    const config = testConfig({ JWT_SECRET: randomBytes(32).toString('hex') });
    const database = createDatabase(databaseUrl);
    const mail = await startMailFake();
    const queue = await startMailQueue({ databaseUrl, smtpUrl: mail.url, from: config.mailFrom, onError: () => undefined, pollingIntervalSeconds: 0.5 });
    const app = createApp({ config, database, outbox: queue });
    const appWith = (env: NodeJS.ProcessEnv) => {
      const c = testConfig({ JWT_SECRET: config.jwtSecret, ...env });
      return createApp({ config: c, database, outbox: queue });
    };
    return { app, config, database, mail, queue, databaseUrl, appWith };
  })();
  return envPromise;
}

export async function closeApiEnv(): Promise<void> {
  if (!envPromise) return;
  const env = await envPromise;
  await env.queue.stop();
  await env.mail.close();
  await env.database.close();
  envPromise = null;
}

export const SPEC_PASSWORD = 'bench-probe-42';
let hashCache: string | null = null;

export const uniqueEmail = (label = 'user') => `${label}-${randomBytes(5).toString('hex')}@spec.example`;

/** A user of the given roles, made directly in the database (a spec's own row). */
export async function makeUser(roles: Role[], opts: { name?: string; active?: boolean; email?: string } = {}) {
  const env = await apiEnv();
  hashCache ??= await bcrypt.hash(SPEC_PASSWORD, 10);
  const [u] = await env.database.db
    .insert(users)
    .values({ email: opts.email ?? uniqueEmail(roles[0] ?? 'none'), name: opts.name ?? `Spec ${roles.join('+') || 'nobody'}`, passwordHash: hashCache, roles, active: opts.active ?? true })
    .returning();
  return u;
}

export interface Session {
  accessToken: string;
  refreshToken: string;
  user: { id: number; email: string; name: string; roles: Role[] };
}

/** Signs in through the API (each call from its own client address, so IP throttling stays apart). */
export async function signIn(email: string, password = SPEC_PASSWORD): Promise<Session> {
  const env = await apiEnv();
  const r = await supertest(env.app).post('/api/auth/sign-in').set('X-Forwarded-For', randomIp()).send({ email, password });
  if (r.status !== 200) throw new Error(`sign-in of ${email} answered ${r.status}: ${JSON.stringify(r.body)}`);
  return r.body as Session;
}

export async function userSession(roles: Role[]): Promise<Session & { id: number }> {
  const u = await makeUser(roles);
  const s = await signIn(u.email);
  return { ...s, id: u.id };
}

/** A client address from the benchmarking range (RFC 2544): only ever a header value. */
export const randomIp = () => `198.${18 + (rand255() % 2)}.${rand255()}.${rand255()}`;
const rand255 = () => Math.floor(Math.random() * 254) + 1;

export const bearer = (s: { accessToken: string }) => ({ Authorization: `Bearer ${s.accessToken}` });
