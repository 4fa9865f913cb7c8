import cookieParser from 'cookie-parser';
import express, { type Express, type RequestHandler, type Response } from 'express';
import helmet from 'helmet';
import { existsSync } from 'node:fs';
import path from 'node:path';
import { pinoHttp } from 'pino-http';
import expressStaticGzip from 'express-static-gzip';
import { env } from './env';
import { logger } from './lib/logger';
import { loadUser } from './middleware/auth';
import { apiNotFound, errorHandler } from './middleware/error';
import { requireBodyType, requireSameOrigin } from './middleware/same-origin';
import { adminRouter, createAdminJobsRouter } from './routes/admin';
import { authRouter } from './routes/auth';
import { backupsRouter } from './routes/backups';
import { crewsRouter } from './routes/crews';
import { cuttersRouter } from './routes/cutters';
import { downtimeRouter } from './routes/downtime';
import { forecastRouter, wearFitRouter } from './routes/forecast';
import { geologyRouter, groundTypesRouter } from './routes/geology';
import { healthRouter } from './routes/health';
import { overviewRouter } from './routes/overview';
import { partsRouter } from './routes/parts';
import { photosRouter } from './routes/photos';
import { positionsRouter } from './routes/positions';
import { projectsRouter } from './routes/projects';
import { roundsRouter } from './routes/rounds';
import { stopsRouter } from './routes/stops';
import { strokesRouter } from './routes/strokes';
import type { JobDefinition } from './services/job-runner';

export interface AppOptions {
  /** The built client (`dist/`) to serve beside the API; omitted in API-only tests and `npm run dev`. */
  clientDir?: string;
  /**
   * The scheduled jobs the administrator may list and run (jobs/index.ts's registry, passed in by
   * the entries; the server does not import jobs/). Without it the app has no jobs to offer.
   */
  jobs?: readonly JobDefinition[];
}

/**
 * Helmet's headers (no upgrade-insecure-requests: the local product is served over plain http on
 * 127.0.0.1). They are the same for every response, so Helmet runs once here and each request gets
 * the recorded headers in one step instead of a dozen middleware calls (decision 45).
 */
export const helmetOptions = { contentSecurityPolicy: { directives: { upgradeInsecureRequests: null } } } as const;

export function securityHeaders(): RequestHandler {
  const set: [string, string][] = [];
  const removed: string[] = [];
  const recorder = {
    setHeader: (name: string, value: unknown) => set.push([name, String(value)]),
    removeHeader: (name: string) => removed.push(name),
  };
  let ran = false;
  helmet(helmetOptions)({} as never, recorder as unknown as Response, () => (ran = true));
  if (!ran) throw new Error('Helmet did not finish synchronously; its headers cannot be recorded once.');
  return (_req, res, next) => {
    for (const [name, value] of set) res.setHeader(name, value);
    for (const name of removed) res.removeHeader(name);
    next();
  };
}

/** Builds the Express app; `listen` happens elsewhere (server/index.ts, server/start.ts, tests). */
export function createApp(options: AppOptions = {}): Express {
  const app = express();
  app.set('trust proxy', env().TRUST_PROXY);
  app.disable('x-powered-by');
  app.use(securityHeaders());
  // One line per request at level info; below it (LOG_LEVEL=warn…) no line would ever be written,
  // so the per-request logger (a child bound to the serialized request) is not made at all.
  // (Unhandled errors are logged by the error handler at level error either way.)
  if (logger.isLevelEnabled('info')) app.use(pinoHttp({ logger, autoLogging: { ignore: (req) => req.url === '/api/health' } }));
  app.use(express.json({ limit: '1mb' }));
  app.use(cookieParser());

  const api = express.Router();
  // Forged cross-site requests are refused before anything else (decision 29).
  api.use(requireSameOrigin, requireBodyType);
  api.use(loadUser);
  api.use('/health', healthRouter);
  api.use('/auth', authRouter);
  api.use('/projects', projectsRouter);
  api.use('/projects/:projectId/positions', positionsRouter);
  api.use('/projects/:projectId/cutters', cuttersRouter);
  api.use('/projects/:projectId/rounds', roundsRouter);
  api.use('/projects/:projectId/photos', photosRouter);
  api.use('/projects/:projectId/ground-types', groundTypesRouter);
  api.use('/projects/:projectId/geology', geologyRouter);
  api.use('/projects/:projectId/strokes', strokesRouter);
  api.use('/projects/:projectId/wear-fit', wearFitRouter);
  api.use('/projects/:projectId/forecast', forecastRouter);
  api.use('/projects/:projectId/crews', crewsRouter);
  api.use('/projects/:projectId/stops', stopsRouter);
  api.use('/projects/:projectId/downtime', downtimeRouter);
  api.use('/projects/:projectId/parts', partsRouter);
  api.use('/projects/:projectId/overview', overviewRouter);
  api.use('/admin/jobs', createAdminJobsRouter(options.jobs ?? []));
  api.use('/admin/backups', backupsRouter);
  api.use('/admin', adminRouter);
  api.use(apiNotFound);
  app.use('/api', api);

  const clientDir = options.clientDir && path.resolve(options.clientDir);
  if (clientDir && existsSync(path.join(clientDir, 'index.html'))) {
    // Hashed assets never change under their name: a year, immutable. Anything else (index.html,
    // unhashed files) is revalidated. Brotli or gzip copies made at build time are sent to a
    // browser that accepts them (decision 44). The service worker and the manifest are unhashed, so
    // they are checked on every visit and a new build is found at once (decision 42).
    app.use(
      expressStaticGzip(clientDir, {
        index: false,
        enableBrotli: true,
        orderPreference: ['br', 'gzip'],
        serveStatic: {
          index: false,
          setHeaders: (res, filePath) => {
            const hashed = /[\\/]assets[\\/][^\\/]+-[A-Za-z0-9_-]{8,}\.[a-z0-9.]+$/.test(filePath);
            res.setHeader('Cache-Control', hashed ? 'public, max-age=31536000, immutable' : 'no-cache');
          },
        },
      }),
    );
    // Client-side routes: every other GET gets the app shell.
    app.get('/{*splat}', (_req, res) => {
      res.set('Cache-Control', 'no-cache').sendFile(path.join(clientDir, 'index.html'));
    });
  }

  app.use(errorHandler);
  return app;
}
