import { Router } from 'express';
import { ROLES } from '@/shared/api/common';
import { passwordResetConfirmSchema, passwordResetRequestSchema, signInRequestSchema } from '@/shared/api/auth';
import { principal, type Principal } from '../../auth/middleware';
import type { RouteDeps } from '../../deps';
import { limiter } from '../../http/rateLimit';
import { parse } from '../../http/validate';
import { confirmPasswordReset, requestPasswordReset, signIn, signOut } from './service';

/** Public part: sign-in and password reset (rate-limited). */
export function publicAuthRoutes({ dataSource, config, mailer, log }: RouteDeps): Router {
  const r = Router();
  const rl = config.rateLimit;
  const signInLimit = limiter(rl.enabled, rl.windowMs, rl.signIn, 'sign-in');
  const resetLimit = limiter(rl.enabled, rl.windowMs, rl.passwordReset, 'password-reset');

  r.post('/auth/sign-in', signInLimit, async (req, res) => {
    res.json(await signIn(dataSource, config, parse(signInRequestSchema, req.body), req.ip));
  });
  r.post('/auth/password-reset', resetLimit, async (req, res) => {
    const { email } = parse(passwordResetRequestSchema, req.body);
    await requestPasswordReset(dataSource, config, mailer, email, log ?? console.error);
    res.status(202).json({ ok: true });
  });
  r.post('/auth/password-reset/confirm', resetLimit, async (req, res) => {
    await confirmPasswordReset(dataSource, config, parse(passwordResetConfirmSchema, req.body));
    res.json({ ok: true });
  });
  return r;
}

/** Signed-in part. */
export function authRoutes({ dataSource, guard }: RouteDeps): Router {
  const r = Router();
  r.get('/auth/me', guard(...ROLES), (req, res) => {
    res.json({ user: principal(req).user });
  });
  r.post('/auth/sign-out', guard(...ROLES), async (req, res) => {
    const p: Principal = principal(req);
    await signOut(dataSource, p.row, p.via);
    res.status(204).end();
  });
  return r;
}
