import type { DataSource } from 'typeorm';
import { IsNull, MoreThan } from 'typeorm';
import type { AcceptInvitationRequest, CreateInvitationRequest, Invitation, InvitationPreview } from '@/shared/api/invitations';
import type { SessionResponse } from '@/shared/api/auth';
import { hashPassword } from '../../auth/passwords';
import { randomSecret, sha256Hex } from '../../auth/secrets';
import type { Config } from '../../config';
import { InvitationEntity, UserEntity, type InvitationRow, type UserRow } from '../../db/entities';
import { AppError } from '../../http/errors';
import type { Mailer } from '../../mail/mailer';
import { recordAudit } from '../audit/service';
import { issueSession } from '../auth/service';
import { labName } from '../users/repository';

export function toInvitationJson(i: InvitationRow): Invitation {
  return {
    id: i.id,
    email: i.email,
    name: i.name,
    role: i.role,
    createdAt: i.createdAt.toISOString(),
    expiresAt: i.expiresAt.toISOString(),
    acceptedAt: i.acceptedAt ? i.acceptedAt.toISOString() : null,
  };
}

export async function listInvitations(ds: DataSource, labId: number): Promise<Invitation[]> {
  const rows = await ds.getRepository(InvitationEntity).find({ where: { labId }, order: { createdAt: 'DESC', id: 'DESC' } });
  return rows.map(toInvitationJson);
}

const NOT_FOUND = 'this invitation is unknown, already used or expired; ask your lab lead for a new one';

async function openInvitation(ds: DataSource, secret: string): Promise<InvitationRow> {
  const inv = await ds.getRepository(InvitationEntity).findOneBy({
    tokenHash: sha256Hex(secret),
    acceptedAt: IsNull(),
    expiresAt: MoreThan(new Date()),
  });
  if (!inv) throw AppError.notFound(NOT_FOUND);
  return inv;
}

export async function previewInvitation(ds: DataSource, secret: string): Promise<InvitationPreview> {
  const inv = await openInvitation(ds, secret);
  return {
    email: inv.email,
    name: inv.name,
    role: inv.role,
    labName: await labName(ds.manager, inv.labId),
    expiresAt: inv.expiresAt.toISOString(),
  };
}

/** Row, audit event and e-mail in one transaction: if the mail cannot be handed over, nothing is kept. */
export async function createInvitation(
  ds: DataSource,
  cfg: Config,
  mailer: Mailer,
  inviter: UserRow,
  req: CreateInvitationRequest,
): Promise<Invitation> {
  if (await ds.getRepository(UserEntity).findOneBy({ email: req.email })) {
    throw AppError.conflict(`${req.email} already has an account`, [{ path: 'email', message: 'already has an account' }]);
  }
  const secret = randomSecret();
  const expiresAt = new Date(Date.now() + cfg.invitationTtlMs);
  const lab = await labName(ds.manager, inviter.labId);
  return ds.transaction(async (em) => {
    const repo = em.getRepository(InvitationEntity);
    const { identifiers } = await repo.insert({
      labId: inviter.labId,
      email: req.email,
      name: req.name,
      role: req.role,
      tokenHash: sha256Hex(secret),
      invitedById: inviter.id,
      expiresAt,
    });
    const row = await repo.findOneByOrFail({ id: identifiers[0].id as number });
    await recordAudit(em, {
      labId: inviter.labId,
      actorId: inviter.id,
      action: 'invitation.create',
      subjectType: 'invitation',
      subjectId: row.id,
      details: { email: req.email, role: req.role },
    });
    try {
      await mailer.sendInvitation({
        to: req.email,
        inviteeName: req.name,
        inviterName: inviter.name,
        labName: lab,
        role: req.role,
        link: `${cfg.appUrl}/accept-invitation?token=${encodeURIComponent(secret)}`,
        expiresAt,
      });
    } catch (e) {
      throw new AppError(502, 'INTERNAL', `the invitation e-mail could not be sent: ${(e as Error).message}`);
    }
    return toInvitationJson(row);
  });
}

export async function acceptInvitation(ds: DataSource, cfg: Config, req: AcceptInvitationRequest): Promise<SessionResponse> {
  const passwordHash = await hashPassword(req.password, cfg.bcryptCost);
  const user = await ds.transaction(async (em) => {
    const repo = em.getRepository(InvitationEntity);
    // Row lock: two tabs accepting the same link cannot both create an account.
    const inv = await repo.findOne({
      where: { tokenHash: sha256Hex(req.token), acceptedAt: IsNull(), expiresAt: MoreThan(new Date()) },
      lock: { mode: 'pessimistic_write' },
    });
    if (!inv) throw AppError.notFound(NOT_FOUND);
    const users = em.getRepository(UserEntity);
    if (await users.findOneBy({ email: inv.email })) throw AppError.conflict(`${inv.email} already has an account`);
    const { identifiers } = await users.insert({
      labId: inv.labId,
      email: inv.email,
      name: req.name ?? inv.name,
      passwordHash,
      role: inv.role,
      active: true,
    });
    const created = await users.findOneByOrFail({ id: identifiers[0].id as number });
    await repo.update({ id: inv.id }, { acceptedAt: new Date(), acceptedUserId: created.id });
    await recordAudit(em, {
      labId: inv.labId,
      actorId: created.id,
      action: 'invitation.accept',
      subjectType: 'invitation',
      subjectId: inv.id,
      details: { userId: created.id, role: inv.role },
    });
    return created;
  });
  return issueSession(ds, cfg, user);
}
