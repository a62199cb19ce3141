import { Router } from 'express';
import { createBatchSchema } from '@/shared/api/batches';
import { ROLES } from '@/shared/api/common';
import { principal } from '../../auth/middleware';
import type { RouteDeps } from '../../deps';
import { parse } from '../../http/validate';
import { createBatch, listBatches } from './service';

export function batchRoutes({ dataSource, guard }: RouteDeps): Router {
  const r = Router();
  r.get('/batches', guard(...ROLES), async (req, res) => {
    res.json({ batches: await listBatches(dataSource, principal(req).user.labId) });
  });
  r.post('/batches', guard('lab_lead', 'device_engineer'), async (req, res) => {
    const body = parse(createBatchSchema, req.body);
    res.status(201).json({ batch: await createBatch(dataSource, principal(req).row, body) });
  });
  return r;
}
