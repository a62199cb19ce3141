import { Router } from 'express';
import type { AuditListResponse } from '@/shared/api/audit';
import { principal } from '../../auth/middleware';
import type { RouteDeps } from '../../deps';
import { listAudit } from './service';

export function auditRoutes({ dataSource, guard }: RouteDeps): Router {
  const r = Router();
  r.get('/audit', guard('lab_lead'), async (req, res) => {
    const body: AuditListResponse = { events: await listAudit(dataSource.manager, principal(req).user.labId) };
    res.json(body);
  });
  return r;
}
