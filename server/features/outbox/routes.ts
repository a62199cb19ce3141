import { Router } from 'express';
import { principal } from '../../auth/middleware';
import type { RouteDeps } from '../../deps';
import { AppError } from '../../http/errors';
import { listOutbox } from './service';

export function outboxRoutes({ dataSource, config, guard }: RouteDeps): Router {
  const r = Router();
  r.get('/outbox', guard('lab_lead'), async (req, res) => {
    principal(req);
    if (!config.demoOutbox) throw AppError.notFound('the outbox exists only in demo mode (FW_DEMO_OUTBOX=1)');
    res.json({ messages: await listOutbox(dataSource) });
  });
  return r;
}
