/**
 * `npm start`: PostgreSQL (installed from Debian's packages if missing; a private cluster on
 * 127.0.0.1:DRIFTMARK_PG_PORT, or DATABASE_URL), migrations, demo seed, the local mail fake
 * (unless SMTP_URL), the Angular build when stale, then the server. Ctrl-C stops it all cleanly.
 */
import { join } from 'node:path';
import { loadConfig, ConfigError } from '../api/config';
import { createDatabase } from '../api/db';
import { startMailFake, type MailFake } from '../api/mail/mail-fake';
import { startServer, PortInUseError } from '../api/server';
import { seedDemo, SeedRefused } from '../seeds/seed';
import { APP_DIST, appBuildIsStale, buildApp } from './app-build';
import { chooseDataDir, ClusterError, portInUse, startCluster, stopCluster, type Cluster } from './cluster';
import { runMigrations } from './migrate';

const say = (s: string) => console.log(`[driftmark] ${s}`);

async function main(): Promise<void> {
  const t0 = Date.now();
  const dataDir = chooseDataDir();
  const config = loadConfig(process.env, { dataDir, appDistDir: APP_DIST });
  if (await portInUse(config.port, config.host === '0.0.0.0' ? '127.0.0.1' : config.host)) {
    throw new PortInUseError(`Port ${config.port} is already in use: is Driftmark already running? Stop the other program or set PORT=<port>.`);
  }
  say(`Data folder: ${dataDir}`);

  let cluster: Cluster | null = null;
  let databaseUrl = process.env.DATABASE_URL;
  if (databaseUrl) say('Using the PostgreSQL server of DATABASE_URL (no private cluster started).');
  else {
    const pgPort = Number(process.env.DRIFTMARK_PG_PORT || 15432);
    if (!Number.isInteger(pgPort) || pgPort < 1024 || pgPort > 65535) throw new ConfigError(`DRIFTMARK_PG_PORT must be a port number (got "${process.env.DRIFTMARK_PG_PORT}")`);
    cluster = await startCluster({ dataDir, port: pgPort, log: say });
    databaseUrl = cluster.url;
    say(`PostgreSQL ${cluster.binDir.split('/').at(-2)} running on 127.0.0.1:${pgPort} (cluster ${cluster.pgDir})`);
  }

  let stopping = false;
  let mailFake: MailFake | null = null;
  let closeServer: (() => Promise<void>) | null = null;
  const shutdown = async (code: number) => {
    if (stopping) return;
    stopping = true;
    say('Stopping…');
    await closeServer?.().catch(() => undefined);
    await mailFake?.close().catch(() => undefined);
    if (cluster) {
      try {
        stopCluster(cluster);
        say('PostgreSQL stopped.');
      } catch (e) {
        console.error(e);
      }
    }
    process.exit(code);
  };
  // 'on', not 'once': Ctrl-C reaches us from the terminal and again through npm; a second
  // signal must not kill the process before PostgreSQL is stopped (shutdown runs once).
  process.on('SIGINT', () => void shutdown(0));
  process.on('SIGTERM', () => void shutdown(0));

  try {
    await runMigrations(databaseUrl);
    const database = createDatabase(databaseUrl, { max: 2 });
    try {
      const created = await seedDemo(database.db);
      if (created) say(`Demo accounts created (password "driftmark-demo"): see README.md.`);
    } catch (e) {
      if (e instanceof SeedRefused) say(e.message);
      else throw e;
    } finally {
      await database.close();
    }

    let smtpUrl = config.smtpUrl;
    if (!smtpUrl) {
      const mailFolder = join(dataDir, 'mail');
      mailFake = await startMailFake({
        port: Number(process.env.DRIFTMARK_SMTP_PORT || 0),
        folder: mailFolder,
        onMail: (m) => {
          const link = m.text.match(/https?:\/\/\S+/)?.[0];
          say(`Mail captured for ${m.to}: "${m.subject}"${link ? ` — ${link}` : ''} (saved in ${mailFolder})`);
        },
      });
      smtpUrl = mailFake.url;
      say(`No SMTP_URL: mail goes to the local mail fake and is saved in ${mailFolder}`);
    }

    if (appBuildIsStale()) buildApp(say);
    else say('The Angular build is up to date.');

    const running = await startServer({ config, databaseUrl, smtpUrl });
    closeServer = running.close;
    say(`Ready in ${((Date.now() - t0) / 1000).toFixed(1)} s: open ${running.url} (Ctrl-C stops the server and PostgreSQL)`);
  } catch (e) {
    console.error(e instanceof Error ? e.message : e);
    await shutdown(1);
  }
}

main().catch((e) => {
  if (e instanceof ConfigError || e instanceof ClusterError || e instanceof PortInUseError) console.error(`[driftmark] ${e.message}`);
  else console.error(e);
  process.exit(1);
});
