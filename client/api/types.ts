// Response shapes of the foundation API (notes/api-foundation.md), as the app reads them.
// Kept client-side so the UI does not depend on server-only modules.
export type Role = 'lab_lead' | 'device_engineer' | 'experimentalist';

export const ROLES: readonly Role[] = ['lab_lead', 'device_engineer', 'experimentalist'];

export const ROLE_LABELS: Record<Role, string> = {
  lab_lead: 'Lab lead',
  device_engineer: 'Device engineer',
  experimentalist: 'Experimentalist',
};

export interface User {
  id: number;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  labId: number;
  labName: string;
}

export interface SignInResult {
  token: string;
  expiresAt: string;
  user: User;
}

export interface InvitationPreview {
  email: string;
  name: string;
  role: Role;
  labName: string;
  expiresAt: string;
}

export interface Invitation {
  id: number;
  email: string;
  name: string;
  role: Role;
  createdAt: string;
  expiresAt: string;
  acceptedAt: string | null;
}

export interface ApiTokenInfo {
  id: number;
  name: string;
  scopes: string[];
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
}

export interface OutboxMessage {
  id: number | string;
  to: string;
  subject: string;
  text: string;
  receivedAt: string;
  links: string[];
}

export interface AuditEvent {
  id: number;
  actor: string;
  action: string;
  subject: string;
  createdAt: string;
  details: unknown;
}

export interface Batch {
  id: number;
  code: string;
  wafer: string | null;
  processNotes: string | null;
  fabricatedOn: string | null;
  deviceCount: number;
}

export type Geometry = 'quarter_wave' | 'phase_only';
export type CalibrationStatus = 'none' | 'proposed' | 'accepted';

export interface Device {
  id: number;
  name: string;
  batchId: number;
  batchCode: string;
  chipPosition: string | null;
  geometry: Geometry;
  designZ0Ohm: number | null;
  designFrequencyHz: number | null;
  loopInductanceH: number | null;
  calibrationStatus: CalibrationStatus;
}

export interface Cooldown {
  id: number;
  startedOn: string;
  fridge: string;
  notes?: string | null;
  [extra: string]: unknown;
}

export interface DeviceDetail {
  device: Device;
  cooldowns: Cooldown[];
}
