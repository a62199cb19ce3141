// Types and zod schemas of the Fluxwright HTTP API, shared by app/ and server/.
export * from './api/common';
export * from './api/auth';
export * from './api/invitations';
export * from './api/users';
export * from './api/tokens';
export * from './api/outbox';
export * from './api/audit';
export * from './api/batches';
export * from './api/devices';
export * from './api/planning';
