import type { DataSource } from 'typeorm';
import type { Config } from './config';
import type { JobRunner } from './jobs/runner';
import type { Mailer } from './mail/mailer';

/** What createApp needs from the outside; tests pass their own. */
export interface AppDeps {
  dataSource: DataSource;
  mailer: Mailer;
  config: Config;
  log?: (msg: string, err?: unknown) => void;
  /** Calibration job runner; createApp makes one when absent (reachable as app.locals.jobs). */
  jobs?: JobRunner;
}

import type { RequestHandler } from 'express';
import type { Role } from '@/shared/api/common';

/** Routers get the deps plus guard(...roles): authentication, then the role check, on each route. */
export interface RouteDeps extends AppDeps {
  guard: (...roles: Role[]) => RequestHandler;
  jobs: JobRunner;
}
