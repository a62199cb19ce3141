import { Router } from 'express';
import { idParamSchema } from '@/shared/api/common';
import { updateUserSchema } from '@/shared/api/users';
import { principal } from '../../auth/middleware';
import type { RouteDeps } from '../../deps';
import { parse } from '../../http/validate';
import { listUsers, updateUser } from './service';

export function userRoutes({ dataSource, guard }: RouteDeps): Router {
  const r = Router();
  r.get('/users', guard('lab_lead'), async (req, res) => {
    res.json({ users: await listUsers(dataSource, principal(req).user.labId) });
  });
  r.patch('/users/:id', guard('lab_lead'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    const body = parse(updateUserSchema, req.body);
    res.json({ user: await updateUser(dataSource, principal(req).row, id, body) });
  });
  return r;
}
