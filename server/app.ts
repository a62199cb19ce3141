import express, { type Express } from 'express';
import helmet from 'helmet';
import { guardFactory } from './auth/middleware';
import type { AppDeps, RouteDeps } from './deps';
import { auditRoutes } from './features/audit/routes';
import { authRoutes, publicAuthRoutes } from './features/auth/routes';
import { batchCompareRoutes } from './features/batchCompare/routes';
import { batchRoutes } from './features/batches/routes';
import { calibrationRoutes } from './features/calibration/routes';
import { deviceRoutes } from './features/devices/routes';
import { invitationRoutes, publicInvitationRoutes } from './features/invitations/routes';
import { outboxRoutes } from './features/outbox/routes';
import { planningRoutes } from './features/planning/routes';
import { tokenRoutes } from './features/tokens/routes';
import { traceRoutes } from './features/traces/routes';
import { userRoutes } from './features/users/routes';
import { apiNotFound, errorMiddleware } from './http/errors';
import { inlineScriptHashes, staticSite } from './http/static';
import { JobRunner } from './jobs/runner';

export type { AppDeps } from './deps';

export interface CreateAppOptions {
  /** Folder with the Expo web export (dist/); omitted in API-only tests. */
  staticDir?: string;
}

export function createApp(deps: AppDeps, opts: CreateAppOptions = {}): Express {
  const { dataSource, config } = deps;
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', false);
  const scriptHashes = opts.staticDir ? inlineScriptHashes(opts.staticDir) : () => [];
  app.use(
    helmet({
      // Served over plain http on 127.0.0.1: HSTS and upgrade-insecure-requests would break it.
      // Behind a TLS proxy, set them there.
      strictTransportSecurity: false,
      contentSecurityPolicy: {
        useDefaults: true,
        directives: {
          // Expo's export inlines one hydration bootstrap script: allowed by its hash, not 'unsafe-inline'.
          // 'wasm-unsafe-eval' lets the chart screens compile Skia's wasm.
          'script-src': ["'self'", "'wasm-unsafe-eval'", () => scriptHashes().join(' ') || "'self'"],
          'upgrade-insecure-requests': null,
          // react-native-web writes its styles into <style> elements at run time.
          'style-src': ["'self'", "'unsafe-inline'"],
          'img-src': ["'self'", 'data:', 'blob:'],
          'font-src': ["'self'", 'data:'],
          'connect-src': ["'self'"],
          'worker-src': ["'self'", 'blob:'],
        },
      },
    }),
  );

  const api = express.Router();
  api.use(express.json({ limit: config.jsonLimit }));
  api.get('/health', (_req, res) => {
    res.json({ ok: true, version: config.version });
  });
  // Each signed-in route carries guard(...roles) itself, so an unknown path is a 404, not a 401.
  // Fit jobs run on worker threads; the pool starts on first use. Callers that created the app
  // stop it with app.locals.jobs.close() (main.ts on shutdown, tests in afterAll).
  const jobs = deps.jobs ?? new JobRunner({ dataSource, mailer: deps.mailer, config, log: deps.log });
  app.locals.jobs = jobs;
  const rd: RouteDeps = { ...deps, jobs, guard: guardFactory(dataSource, config.jwtSecret) };
  for (const routes of [
    publicAuthRoutes,
    publicInvitationRoutes,
    authRoutes,
    invitationRoutes,
    userRoutes,
    tokenRoutes,
    outboxRoutes,
    auditRoutes,
    batchRoutes,
    deviceRoutes,
    traceRoutes,
    calibrationRoutes,
    planningRoutes,
    batchCompareRoutes,
  ]) {
    api.use(routes(rd));
  }
  api.use(apiNotFound);

  app.use('/api', api);
  if (opts.staticDir) app.use(staticSite(opts.staticDir));
  app.use(apiNotFound);
  app.use(errorMiddleware(deps.log));
  return app;
}
