import { Router } from 'express';
import { idParamSchema, ROLES } from '@/shared/api/common';
import { createCooldownSchema, createDeviceSchema, deviceListQuerySchema } from '@/shared/api/devices';
import { principal } from '../../auth/middleware';
import type { RouteDeps } from '../../deps';
import { parse } from '../../http/validate';
import { addCooldown, createDevice, getDevice, listDevices } from './service';

export function deviceRoutes({ dataSource, guard }: RouteDeps): Router {
  const r = Router();
  r.get('/devices', guard(...ROLES), async (req, res) => {
    const q = parse(deviceListQuerySchema, req.query, 'query');
    res.json({ devices: await listDevices(dataSource, principal(req).user.labId, q) });
  });
  r.post('/devices', guard('lab_lead', 'device_engineer'), async (req, res) => {
    const body = parse(createDeviceSchema, req.body);
    res.status(201).json({ device: await createDevice(dataSource, principal(req).row, body) });
  });
  r.get('/devices/:id', guard(...ROLES), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    res.json(await getDevice(dataSource, principal(req).user.labId, id));
  });
  r.post('/devices/:id/cooldowns', guard('lab_lead', 'device_engineer'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    const body = parse(createCooldownSchema, req.body);
    res.status(201).json({ cooldown: await addCooldown(dataSource, principal(req).row, id, body) });
  });
  return r;
}
