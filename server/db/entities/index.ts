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
export * from './Sweep';
export * from './Fit';
export * from './Job';
export * from './Plan';
export * from './PumpLine';
export * from './SpecWindow';

import { ApiTokenEntity } from './ApiToken';
import { AuditEventEntity } from './AuditEvent';
import { CooldownEntity } from './Cooldown';
import { DeviceEntity } from './Device';
import { FabBatchEntity } from './FabBatch';
import { FitEntity } from './Fit';
import { InvitationEntity } from './Invitation';
import { JobEntity } from './Job';
import { LabEntity } from './Lab';
import { MailMessageEntity } from './MailMessage';
import { PasswordResetEntity } from './PasswordReset';
import { PlanEntity, PlanNoteEntity } from './Plan';
import { PumpLineEntity } from './PumpLine';
import { SpecWindowEntity } from './SpecWindow';
import { SweepEntity, SweepFileEntity } from './Sweep';
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
  SweepEntity,
  SweepFileEntity,
  FitEntity,
  JobEntity,
  PlanEntity,
  PlanNoteEntity,
  PumpLineEntity,
  SpecWindowEntity,
];
