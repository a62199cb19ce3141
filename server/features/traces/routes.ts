import { Router } from 'express';
import { ROLES } from '@/shared/api/common';
import { traceParamsSchema } from '@/shared/api/traces';
import { principal } from '../../auth/middleware';
import type { RouteDeps } from '../../deps';
import { parse } from '../../http/validate';
import { traceView } from './service';

/** GET /api/fits/:id/traces/:index: any signed-in member of the fit's lab. */
export function traceRoutes({ dataSource, guard }: RouteDeps): Router {
  const r = Router();
  r.get('/fits/:id/traces/:index', guard(...ROLES), async (req, res) => {
    const { id, index } = parse(traceParamsSchema, req.params, 'params');
    res.json({ trace: await traceView(dataSource, principal(req).user.labId, id, index) });
  });
  return r;
}
