import { Router } from 'express';
import { z } from 'zod';
import { acceptInvitationSchema, createInvitationSchema } from '@/shared/api/invitations';
import { principal } from '../../auth/middleware';
import type { RouteDeps } from '../../deps';
import { parse } from '../../http/validate';
import { acceptInvitation, createInvitation, listInvitations, previewInvitation } from './service';

const tokenParam = z.object({ token: z.string().min(1).max(200) });

export function publicInvitationRoutes({ dataSource, config }: RouteDeps): Router {
  const r = Router();
  r.post('/invitations/accept', async (req, res) => {
    res.json(await acceptInvitation(dataSource, config, parse(acceptInvitationSchema, req.body)));
  });
  r.get('/invitations/:token', async (req, res) => {
    const { token } = parse(tokenParam, req.params, 'params');
    res.json(await previewInvitation(dataSource, token));
  });
  return r;
}

export function invitationRoutes({ dataSource, config, mailer, guard }: RouteDeps): Router {
  const r = Router();
  r.get('/invitations', guard('lab_lead'), async (req, res) => {
    res.json({ invitations: await listInvitations(dataSource, principal(req).user.labId) });
  });
  r.post('/invitations', guard('lab_lead'), async (req, res) => {
    const body = parse(createInvitationSchema, req.body);
    const invitation = await createInvitation(dataSource, config, mailer, principal(req).row, body);
    res.status(201).json({ invitation });
  });
  return r;
}
