import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import cookieParser from 'cookie-parser';
import express, { type Express } from 'express';
import helmet from 'helmet';
import pino, { type Logger } from 'pino';
import { pinoHttp } from 'pino-http';
import type { DataSource } from 'typeorm';
import { createSessions } from './auth/sessions.js';
import type { Config } from './config.js';
import { loadSession } from './middleware/authenticate.js';
import { errorHandler, notFoundHandler } from './middleware/errors.js';
import { sameOrigin } from './middleware/same-origin.js';
import { requireUtf8 } from './middleware/utf8-body.js';
import { routeTable, type RouteEntry } from './routes/index.js';
import { createServices, type Services } from './services/index.js';

/** What `createApp` returns: the Express app plus the pieces tests and jobs reach for. */
export interface AppBundle {
  app: Express;
  services: Services;
  routes: RouteEntry[];
  log: Logger;
}

// package.json sits one folder up from server/ when run from source, three up from dist/node/server/.
const here = path.dirname(fileURLToPath(import.meta.url));
const packageJson = [path.resolve(here, '../package.json'), path.resolve(here, '../../../package.json')].find((p) => existsSync(p));
const version = packageJson ? (JSON.parse(readFileSync(packageJson, 'utf8')) as { version: string }).version : 'unknown';

/** The path segment after an invitation, reset or unsubscribe prefix, API or app page: a bearer secret. */
const LINK_TOKEN_IN_PATH = /(\/(?:invitations\/token|password-reset|unsubscribe|invite|reset)\/)[^/?#]+/g;

/** Builds the Express app over an initialized DataSource; never listens. */
export function createApp({ config, dataSource, log = pino({ level: config.logLevel }) }: { config: Config; dataSource: DataSource; log?: Logger }): AppBundle {
  const sessions = createSessions(dataSource, config);
  const services = createServices(dataSource, config, sessions, log);
  const routes = routeTable(services, config, dataSource, version);

  const app = express();
  app.disable('x-powered-by');
  if (config.trustProxy) app.set('trust proxy', 1);

  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          // Map tiles and previews are same-origin images or blob/data URLs.
          'img-src': ["'self'", 'data:', 'blob:'],
          'upgrade-insecure-requests': config.secureCookies ? [] : null,
        },
      },
      strictTransportSecurity: config.secureCookies,
    }),
  );
  app.use(
    pinoHttp({
      logger: log,
      genReqId: (req, res) => {
        const id = (req.headers['x-request-id'] as string | undefined)?.slice(0, 64) || crypto.randomUUID();
        res.setHeader('X-Request-Id', id);
        return id;
      },
      redact: ['req.headers.cookie', 'req.headers.authorization', 'res.headers["set-cookie"]'],
      // Link tokens (invitation, password reset, unsubscribe) sit in the path; whoever reads the
      // log must not be able to use them.
      serializers: { req: (req: { url?: string }) => Object.assign(req, { url: req.url?.replace(LINK_TOKEN_IN_PATH, '$1[redacted]') }) },
      customLogLevel: (_req, res, err) => (err || res.statusCode >= 500 ? 'error' : res.statusCode >= 400 ? 'warn' : 'info'),
    }),
  );
  app.use(cookieParser());

  const api = express.Router();
  // API answers hold one person's data: no cache keeps them unless a route says otherwise
  // (tiles and previews never change, and set their own private caching).
  api.use((_req, res, next) => {
    res.setHeader('Cache-Control', 'no-store');
    next();
  });
  api.use(express.json({ limit: '256kb', verify: requireUtf8 }));
  api.use(loadSession(sessions));
  api.use(sameOrigin(config.baseUrl));
  for (const { path: p, router } of routes) api.use(p, router);
  api.use(notFoundHandler);
  app.use('/api', api);

  // The built SPA, with history fallback for client-side routes.
  if (existsSync(path.join(config.webDir, 'index.html'))) {
    app.use(express.static(config.webDir, { index: false, maxAge: '1h', setHeaders: (res, file) => {
      if (file.includes(`${path.sep}assets${path.sep}`)) res.setHeader('Cache-Control', 'public, max-age=31536000, immutable');
    } }));
    app.get('/{*splat}', (_req, res) => {
      res.setHeader('Cache-Control', 'no-cache');
      res.sendFile(path.join(config.webDir, 'index.html'));
    });
  }

  app.use(errorHandler);
  return { app, services, routes, log };
}
