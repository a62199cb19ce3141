export * from './Lab';
export * from './User';
export * from './Invitation';
export * from './PasswordReset';
export * from './ApiToken';
export * from './AuditEvent';
export * from './FabBatch';
export * from './Device';
export * from './Cooldown';
export * from './MailMessage';

import { ApiTokenEntity } from './ApiToken';
import { AuditEventEntity } from './AuditEvent';
import { CooldownEntity } from './Cooldown';
import { DeviceEntity } from './Device';
import { FabBatchEntity } from './FabBatch';
import { InvitationEntity } from './Invitation';
import { LabEntity } from './Lab';
import { MailMessageEntity } from './MailMessage';
import { PasswordResetEntity } from './PasswordReset';
import { UserEntity } from './User';

export const ENTITIES = [
  LabEntity,
  UserEntity,
  InvitationEntity,
  PasswordResetEntity,
  ApiTokenEntity,
  AuditEventEntity,
  FabBatchEntity,
  DeviceEntity,
  CooldownEntity,
  MailMessageEntity,
];
