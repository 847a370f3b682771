/**
 * The server under load, in its own process so that autocannon (in the bench's process) does not
 * share its event loop. Started by bench/api.ts with fork(); reads its settings from the
 * environment, starts the mail fake and the real server, reports its URL over IPC, and stops on
 * the message 'stop' (or when the parent goes away).
 */
import { pino } from 'pino';
import { loadConfig } from '../api/config';
import { startMailFake } from '../api/mail/mail-fake';
import { startServer } from '../api/server';

const need = (name: string): string => {
  const v = process.env[name];
  if (!v) throw new Error(`bench/api-server.ts needs ${name}`);
  return v;
};

const mail = await startMailFake();
const config = loadConfig(
  {
    NODE_ENV: 'development',
    PORT: '0',
    HOST: '127.0.0.1',
    JWT_SECRET: need('BENCH_JWT_SECRET'),
    // The configured maxima (api/config.ts): the bench measures the routes, not the limiters.
    CALC_RATE_LIMIT_PER_MINUTE: '10000000',
    SIGN_IN_IP_LIMIT: '100000',
    SIGN_IN_ACCOUNT_LIMIT: '10000',
  },
  { dataDir: need('BENCH_APP_DATA_DIR'), appDistDir: need('BENCH_APP_DIST_DIR') },
);
// Request logging stays on, as deployed, but is written to /dev/null so stdout keeps only figures.
const log = pino({ level: 'info' }, pino.destination({ dest: '/dev/null', sync: false }));
const running = await startServer({ config, databaseUrl: need('BENCH_DATABASE_URL'), smtpUrl: mail.url, log });

let stopping = false;
async function stop(): Promise<void> {
  if (stopping) return;
  stopping = true;
  await running.close().catch(() => undefined);
  await mail.close().catch(() => undefined);
  process.exit(0);
}
process.on('message', (m) => {
  if (m === 'stop') void stop();
  // The load bench asks for the server's memory while it runs.
  if (m === 'memory') process.send?.({ memory: process.memoryUsage() });
});
process.on('disconnect', () => void stop());
process.on('SIGTERM', () => void stop());
process.send?.({ url: running.url });
