import { Router } from 'express';
import { idParamSchema, ROLES, type Role } from '@/shared/api/common';
import {
  noteRequestSchema, operatingPointsQuerySchema, planListQuerySchema, previewRequestSchema, pumpLineSchema, replanRequestSchema, savePlanRequestSchema,
} from '@/shared/api/planning';
import { principal } from '../../auth/middleware';
import type { RouteDeps } from '../../deps';
import { parse } from '../../http/validate';
import {
  addNote, exportPlan, getPlan, getPumpLine, listPlans, operatingPoints, previewPlan, putPumpLine, replan, savePlan,
} from './service';

/** Who saves plans and re-plans (everyone may read and preview). */
const PLANNERS: Role[] = ['experimentalist', 'lab_lead'];

export function planningRoutes({ dataSource, guard }: RouteDeps): Router {
  const r = Router();
  r.post('/plans/preview', guard(...ROLES), async (req, res) => {
    const body = parse(previewRequestSchema, req.body);
    res.json(await previewPlan(dataSource, principal(req).row, body));
  });
  r.post('/plans', guard(...PLANNERS), async (req, res) => {
    const body = parse(savePlanRequestSchema, req.body);
    res.status(201).json({ plan: await savePlan(dataSource, principal(req).row, body) });
  });
  r.get('/plans', guard(...ROLES), async (req, res) => {
    const q = parse(planListQuerySchema, req.query, 'query');
    res.json({ plans: await listPlans(dataSource, principal(req).user.labId, q.device) });
  });
  r.get('/plans/:id/export', guard(...ROLES), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    const file = await exportPlan(dataSource, principal(req).row, id);
    res.attachment(file.filename);
    res.set('Content-Type', file.contentType);
    res.send(file.body);
  });
  r.get('/plans/:id', guard(...ROLES), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    res.json({ plan: await getPlan(dataSource, principal(req).user.labId, id) });
  });
  r.post('/plans/:id/replan', guard(...PLANNERS), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    const body = parse(replanRequestSchema, req.body);
    res.status(201).json({ plan: await replan(dataSource, principal(req).row, id, body) });
  });
  // Any role reaches the handler; the service allows the plan's author or a lab lead (else 403).
  r.post('/plans/:id/notes', guard(...ROLES), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    const body = parse(noteRequestSchema, req.body);
    res.status(201).json({ note: await addNote(dataSource, principal(req).row, id, body) });
  });
  r.get('/devices/:id/operating-points', guard(...ROLES), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    const q = parse(operatingPointsQuerySchema, req.query, 'query');
    res.json(await operatingPoints(dataSource, principal(req).row, id, q));
  });
  r.get('/devices/:id/pump-line', guard(...ROLES), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    res.json({ pumpLine: await getPumpLine(dataSource, principal(req).user.labId, id) });
  });
  r.put('/devices/:id/pump-line', guard('lab_lead', 'experimentalist', 'device_engineer'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    const body = parse(pumpLineSchema, req.body);
    res.json({ pumpLine: await putPumpLine(dataSource, principal(req).row, id, body) });
  });
  return r;
}
