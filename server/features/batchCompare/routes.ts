import { Router } from 'express';
import { ROLES } from '@/shared/api/common';
import { batchCompareQuerySchema, specWindowParamSchema, specWindowRequestSchema } from '@/shared/api/planning';
import { principal } from '../../auth/middleware';
import type { RouteDeps } from '../../deps';
import { parse } from '../../http/validate';
import { compareBatches, deleteSpecWindow, exportCompareCsv, listSpecWindows, putSpecWindow } from './service';

export function batchCompareRoutes({ dataSource, guard }: RouteDeps): Router {
  const r = Router();
  r.get('/batches/compare', guard(...ROLES), async (req, res) => {
    const q = parse(batchCompareQuerySchema, req.query, 'query');
    res.json(await compareBatches(dataSource, principal(req).user.labId, q));
  });
  r.get('/batches/compare.csv', guard(...ROLES), async (req, res) => {
    const q = parse(batchCompareQuerySchema, req.query, 'query');
    const file = await exportCompareCsv(dataSource, principal(req).row, q);
    res.attachment(file.filename);
    res.set('Content-Type', 'text/csv; charset=utf-8');
    res.send(file.body);
  });
  r.get('/spec-windows', guard(...ROLES), async (req, res) => {
    res.json({ specWindows: await listSpecWindows(dataSource, principal(req).user.labId) });
  });
  r.put('/spec-windows/:param', guard('lab_lead'), async (req, res) => {
    const { param } = parse(specWindowParamSchema, req.params, 'params');
    const body = parse(specWindowRequestSchema, req.body);
    res.json({ specWindow: await putSpecWindow(dataSource, principal(req).row, param, body) });
  });
  r.delete('/spec-windows/:param', guard('lab_lead'), async (req, res) => {
    const { param } = parse(specWindowParamSchema, req.params, 'params');
    await deleteSpecWindow(dataSource, principal(req).row, param);
    res.status(204).end();
  });
  return r;
}
