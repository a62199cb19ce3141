import { Router } from 'express';
import { idParamSchema, ROLES } from '@/shared/api/common';
import { createApiTokenSchema } from '@/shared/api/tokens';
import { principal } from '../../auth/middleware';
import type { RouteDeps } from '../../deps';
import { parse } from '../../http/validate';
import { createToken, listOwnTokens, revokeToken } from './service';

export function tokenRoutes({ dataSource, guard }: RouteDeps): Router {
  const r = Router();
  r.get('/tokens', guard(...ROLES), async (req, res) => {
    res.json({ tokens: await listOwnTokens(dataSource, principal(req).row.id) });
  });
  r.post('/tokens', guard(...ROLES), async (req, res) => {
    const body = parse(createApiTokenSchema, req.body);
    res.status(201).json(await createToken(dataSource, principal(req).row, body));
  });
  r.delete('/tokens/:id', guard(...ROLES), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    await revokeToken(dataSource, principal(req).row, id);
    res.status(204).end();
  });
  return r;
}
