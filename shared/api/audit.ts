export interface AuditActor {
  id: number;
  name: string;
  email: string;
}
export interface AuditSubject {
  type: string;
  id: string | null;
}
export interface AuditEvent {
  id: number;
  actor: AuditActor | null;
  action: string;
  subject: AuditSubject | null;
  createdAt: string;
  details: Record<string, unknown> | null;
}
export interface AuditListResponse {
  events: AuditEvent[];
}
