// Response shapes of the API as the app reads them: the shared/ definitions (one source for app and
// server), plus a few display helpers that only the app needs.
import type { Role } from '@/shared/api/common';
export { ROLES } from '@/shared/api/common';
export type { Role } from '@/shared/api/common';
export type { User, SessionResponse as SignInResult } from '@/shared/api/auth';
export type { Invitation, InvitationPreview } from '@/shared/api/invitations';
export type { ApiToken as ApiTokenInfo } from '@/shared/api/tokens';
export type { OutboxMessage } from '@/shared/api/outbox';
export type { AuditEvent } from '@/shared/api/audit';
export type { FabBatch as Batch } from '@/shared/api/batches';
export type { Device, Geometry, CalibrationStatus, Cooldown, DeviceDetailResponse as DeviceDetail } from '@/shared/api/devices';

export const ROLE_LABELS: Record<Role, string> = {
  lab_lead: 'Lab lead',
  device_engineer: 'Device engineer',
  experimentalist: 'Experimentalist',
};

