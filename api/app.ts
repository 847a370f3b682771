import { performance } from 'node:perf_hooks';
/**
 * createApp(deps) builds the Express app without listening (specs call it through supertest);
 * api/server.ts listens. Configuration and services are passed in.
 */
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import express, { type Express } from 'express';
import helmet from 'helmet';
import { pino, type Logger } from 'pino';
import { pinoHttp } from 'pino-http';
import { createAuthGuards } from './auth/guards';
import type { AppConfig } from './config';
import type { Ctx, Faults } from './context';
import type { Database } from './db';
import { apiNotFound, errorMiddleware } from './http/errors';
import { mountRoutes, type RouteDef } from './http/route-table';
import type { Outbox } from './mail/outbox';
import { buildRouteTable } from './routes';
import { storageFromConfig, type Storage } from './storage/index';

export interface AppDeps {
  config: AppConfig;
  database: Database;
  outbox: Outbox;
  log?: Logger;
  /** Where uploads live; by default what the settings say (a folder under the data folder). */
  storage?: Storage;
  /** Fault seams around the commit of a save (specs: spec/api/reading-faults.spec.ts); default none. */
  faults?: Faults;
}

/** The content security policy (decision recorded in DEVELOPERS.md). */
export const CONTENT_SECURITY_POLICY = {
  defaultSrc: ["'self'"],
  scriptSrc: ["'self'"],
  // Angular and Material set component styles at run time (<style> elements and style attributes).
  styleSrc: ["'self'", "'unsafe-inline'"],
  imgSrc: ["'self'", 'data:', 'blob:'],
  fontSrc: ["'self'"],
  connectSrc: ["'self'"],
  workerSrc: ["'self'"],
  // Schematics (PDF) open in a frame from a blob: URL the app made from the fetched file.
  frameSrc: ["'self'", 'blob:'],
  manifestSrc: ["'self'"],
  objectSrc: ["'none'"],
  baseUri: ["'self'"],
  frameAncestors: ["'none'"],
  formAction: ["'self'"],
};

export function linkBaseOf(config: AppConfig): string {
  if (config.publicBaseUrl) return config.publicBaseUrl;
  const host = config.host === '0.0.0.0' || config.host === '::' ? '127.0.0.1' : config.host;
  return `${config.tls ? 'https' : 'http'}://${host}:${config.port}`;
}

export function createApp(deps: AppDeps): Express & { routeTable: readonly RouteDef[] } {
  const { config, database } = deps;
  const log = deps.log ?? pino({ level: config.nodeEnv === 'test' ? 'silent' : 'info' });
  const ctx: Ctx = { db: database.db, config, outbox: deps.outbox, linkBase: linkBaseOf(config), storage: deps.storage ?? storageFromConfig(config), ...(deps.faults ? { faults: deps.faults } : {}) };
  const app = express() as Express & { routeTable: readonly RouteDef[] };
  app.set('trust proxy', config.trustProxy);
  app.disable('x-powered-by');
  // When the request arrived: routes that report their own server time (Server-Timing) read it.
  app.use((_req, res, next) => {
    res.locals['startedAt'] = performance.now();
    next();
  });
  app.use(
    helmet({
      contentSecurityPolicy: { useDefaults: false, directives: { ...CONTENT_SECURITY_POLICY, ...(config.tls ? { upgradeInsecureRequests: [] } : {}) } },
      strictTransportSecurity: config.tls ? { maxAge: 15552000 } : false,
      crossOriginEmbedderPolicy: false,
    }),
  );
  if (log.level !== 'silent') {
    // One structured line per API request: method, path, status, time — never headers or bodies
    // (they carry tokens and passwords).
    app.use(
      pinoHttp({
        logger: log,
        autoLogging: { ignore: (req) => !req.url?.startsWith('/api/') },
        serializers: {
          req: (req: { id: unknown; method: string; url: string }) => ({ id: req.id, method: req.method, path: req.url.split('?')[0] }),
          res: (res: { statusCode: number }) => ({ status: res.statusCode }),
        },
      }),
    );
  }

  app.use('/api/calc', express.json({ limit: config.calc.bodyLimitBytes, strict: true }));
  app.use('/api', express.json({ limit: config.bodyLimitBytes, strict: true }));
  app.use('/api', (_req, res, next) => {
    res.setHeader('Cache-Control', 'no-store');
    next();
  });
  const routes = buildRouteTable(ctx, database.pool);
  mountRoutes(app, routes, createAuthGuards(database.db, config.jwtSecret));
  app.use('/api', apiNotFound);

  // The Angular app: hashed assets cached long, the service worker files never; every other GET
  // that accepts HTML gets the app shell (deep links and reloads work).
  const dist = config.appDistDir;
  app.use(
    express.static(dist, {
      index: false,
      setHeaders(res, path) {
        if (/ngsw(-worker)?\.js(on)?$|safety-worker\.js$|index\.html$/.test(path)) res.setHeader('Cache-Control', 'no-cache');
        else if (/-[A-Z0-9]{8,}\.(js|css)$/.test(path) || /\/media\//.test(path)) res.setHeader('Cache-Control', 'public, max-age=31536000, immutable');
      },
    }),
  );
  app.get('/{*splat}', (req, res, next) => {
    if (!req.accepts('html')) return next();
    const index = join(dist, 'index.html');
    if (!existsSync(index)) {
      res.status(503).type('text/plain').send('The Driftmark app is not built yet: run `npm run build` (npm start does it for you).');
      return;
    }
    res.setHeader('Cache-Control', 'no-cache');
    res.sendFile(index);
  });
  app.use((req, res) => {
    res.status(404).json({ error: { code: 'not-found', message: `Nothing at ${req.path}.` } });
  });
  app.use(errorMiddleware(log));
  app.routeTable = routes;
  return app;
}
