import type { DataSource } from 'typeorm';
import { IsNull, MoreThan } from 'typeorm';
import type { SessionResponse, SignInRequest, PasswordResetConfirm } from '@/shared/api/auth';
import { signAccessToken } from '../../auth/jwt';
import { checkPassword, dummyHash, hashPassword } from '../../auth/passwords';
import { randomSecret, sha256Hex } from '../../auth/secrets';
import type { Config } from '../../config';
import { PasswordResetEntity, UserEntity, type UserRow } from '../../db/entities';
import { AppError } from '../../http/errors';
import type { Mailer } from '../../mail/mailer';
import { recordAudit } from '../audit/service';
import { findUserByEmail, labName, toUserJson } from '../users/repository';

export async function issueSession(ds: DataSource, cfg: Config, user: UserRow): Promise<SessionResponse> {
  const { token, expiresAt } = signAccessToken(user, cfg.jwtSecret, cfg.jwtExpiresInSeconds);
  return { token, expiresAt: expiresAt.toISOString(), user: toUserJson(user, await labName(ds.manager, user.labId)) };
}

export async function signIn(ds: DataSource, cfg: Config, req: SignInRequest, ip: string | undefined): Promise<SessionResponse> {
  const user = await findUserByEmail(ds.manager, req.email);
  const ok = await checkPassword(req.password, user?.passwordHash ?? (await dummyHash(cfg.bcryptCost)));
  if (!user || !ok) {
    if (user) {
      await recordAudit(ds.manager, {
        labId: user.labId,
        actorId: null,
        action: 'auth.sign_in_failed',
        subjectType: 'user',
        subjectId: user.id,
        details: { ip: ip ?? null },
      });
    }
    throw AppError.unauthenticated('e-mail or password is wrong');
  }
  if (!user.active) throw AppError.unauthenticated('this account is deactivated; ask your lab lead');
  await recordAudit(ds.manager, {
    labId: user.labId,
    actorId: user.id,
    action: 'auth.sign_in',
    subjectType: 'user',
    subjectId: user.id,
    details: { ip: ip ?? null },
  });
  return issueSession(ds, cfg, user);
}

export async function signOut(ds: DataSource, user: UserRow, via: string): Promise<void> {
  await recordAudit(ds.manager, {
    labId: user.labId,
    actorId: user.id,
    action: 'auth.sign_out',
    subjectType: 'user',
    subjectId: user.id,
    details: { via },
  });
}

/**
 * Always succeeds from the caller's view (no account enumeration). For an active account it stores
 * the hash of a one-hour single-use secret and e-mails the link; mail goes out after the answer.
 */
export async function requestPasswordReset(
  ds: DataSource,
  cfg: Config,
  mailer: Mailer,
  email: string,
  log: (msg: string, err?: unknown) => void,
): Promise<void> {
  const user = await findUserByEmail(ds.manager, email);
  if (!user || !user.active) return;
  const secret = randomSecret();
  const expiresAt = new Date(Date.now() + cfg.passwordResetTtlMs);
  await ds.transaction(async (em) => {
    await em.getRepository(PasswordResetEntity).insert({ userId: user.id, tokenHash: sha256Hex(secret), expiresAt });
    await recordAudit(em, {
      labId: user.labId,
      actorId: null,
      action: 'auth.password_reset_requested',
      subjectType: 'user',
      subjectId: user.id,
    });
  });
  const link = `${cfg.appUrl}/reset-password?token=${encodeURIComponent(secret)}`;
  mailer
    .sendPasswordReset({ to: user.email, name: user.name, link, expiresAt })
    .catch((e) => log(`password-reset mail to ${user.email} failed`, e));
}

export async function confirmPasswordReset(ds: DataSource, cfg: Config, req: PasswordResetConfirm): Promise<void> {
  const passwordHash = await hashPassword(req.password, cfg.bcryptCost);
  await ds.transaction(async (em) => {
    const resets = em.getRepository(PasswordResetEntity);
    const reset = await resets.findOne({
      where: { tokenHash: sha256Hex(req.token), usedAt: IsNull(), expiresAt: MoreThan(new Date()) },
      lock: { mode: 'pessimistic_write' },
    });
    if (!reset) throw AppError.notFound('this reset link is unknown, used or expired; ask for a new one');
    const user = await em.getRepository(UserEntity).findOneBy({ id: reset.userId });
    if (!user || !user.active) throw AppError.notFound('this reset link is unknown, used or expired; ask for a new one');
    const now = new Date();
    await em.getRepository(UserEntity).update({ id: user.id }, { passwordHash });
    // Any other outstanding link for this account dies with this one.
    await resets.update({ userId: user.id, usedAt: IsNull() }, { usedAt: now });
    await recordAudit(em, {
      labId: user.labId,
      actorId: user.id,
      action: 'auth.password_reset',
      subjectType: 'user',
      subjectId: user.id,
    });
  });
}
