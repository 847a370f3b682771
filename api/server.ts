/**
 * Listens: builds the services (database, mail queue), the app, and an HTTP or HTTPS server;
 * shuts down on SIGINT/SIGTERM when run directly. `npm start` calls startServer() itself after
 * preparing the cluster (scripts/start.ts).
 */
import { readFileSync } from 'node:fs';
import { createServer as createHttpServer, type Server } from 'node:http';
import { createServer as createHttpsServer } from 'node:https';
import type { AddressInfo } from 'node:net';
import { join } from 'node:path';
import { pino, type Logger } from 'pino';
import { createApp, linkBaseOf } from './app';
import { scheduleDueReminders } from './classes/due-reminders';
import { loadConfig, type AppConfig } from './config';
import { createDatabase } from './db';
import { startMailQueue } from './mail/outbox';
import { storageFromConfig } from './storage/index';

export interface RunningServer {
  server: Server;
  url: string;
  config: AppConfig;
  close(): Promise<void>;
}

export class PortInUseError extends Error {}

export async function startServer(opts: { config: AppConfig; databaseUrl: string; smtpUrl: string; log?: Logger }): Promise<RunningServer> {
  const { config } = opts;
  const log = opts.log ?? pino({ level: config.nodeEnv === 'test' ? 'silent' : 'info' });
  const database = createDatabase(opts.databaseUrl, { onError: (err) => log.warn({ err: err.message }, 'database connection lost') });
  const mail = await startMailQueue({
    databaseUrl: opts.databaseUrl,
    smtpUrl: opts.smtpUrl,
    from: config.mailFrom,
    onError: (err) => log.warn({ err: err.message }, 'mail queue error'),
  });
  // Listen first, then build the app with the port actually bound (PORT=0 picks a free one), so
  // links in mail name the right address.
  const server = config.tls
    ? createHttpsServer({ cert: readFileSync(config.tls.certFile), key: readFileSync(config.tls.keyFile) })
    : createHttpServer();
  try {
    await new Promise<void>((resolve, reject) => {
      server.once('error', (err: NodeJS.ErrnoException) => {
        if (err.code === 'EADDRINUSE') reject(new PortInUseError(`Port ${config.port} on ${config.host} is already in use. Stop the other program or choose another port with PORT=<port>.`));
        else reject(err);
      });
      server.listen(config.port, config.host, () => resolve());
    });
  } catch (e) {
    await mail.stop().catch(() => undefined);
    await database.close().catch(() => undefined);
    throw e;
  }
  const port = (server.address() as AddressInfo).port;
  const bound = { ...config, port };
  server.on('request', createApp({ config: bound, database, outbox: mail, log, storage: storageFromConfig(bound) }));
  // Due-date reminders: a job of the mail queue every 15 minutes (one schedule however many processes).
  try {
    await scheduleDueReminders(mail.boss, { db: database.db, outbox: mail, linkBase: linkBaseOf(bound) }, { onError: (err) => log.warn({ err: err.message }, 'due reminders failed') });
  } catch (e) {
    server.close();
    await mail.stop().catch(() => undefined);
    await database.close().catch(() => undefined);
    throw e;
  }
  const url = linkBaseOf({ ...bound, publicBaseUrl: null });
  return {
    server,
    url,
    config: bound,
    async close() {
      await new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      });
      await mail.stop().catch(() => undefined);
      await database.close().catch(() => undefined);
    },
  };
}

/** `node api/server.ts` with DATABASE_URL and SMTP_URL set: serve until SIGINT/SIGTERM. */
if (import.meta.url === `file://${process.argv[1]}`) {
  const root = join(new URL('.', import.meta.url).pathname, '..');
  const config = loadConfig(process.env, { dataDir: process.env.DRIFTMARK_DATA_DIR ?? join(root, '.data'), appDistDir: join(root, 'dist', 'driftmark', 'browser') });
  if (!process.env.DATABASE_URL || !config.smtpUrl) {
    console.error('api/server.ts needs DATABASE_URL and SMTP_URL; `npm start` sets everything up for you.');
    process.exit(2);
  }
  const running = await startServer({ config, databaseUrl: process.env.DATABASE_URL, smtpUrl: config.smtpUrl });
  console.log(`Driftmark listening on ${running.url}`);
  const stop = () => running.close().then(() => process.exit(0));
  process.once('SIGINT', stop);
  process.once('SIGTERM', stop);
}
