import { z } from 'zod';
import { emailSchema, newPasswordSchema, personNameSchema, roleSchema, type Role } from './common';

export const createInvitationSchema = z.object({
  email: emailSchema,
  name: personNameSchema,
  role: roleSchema,
});
export type CreateInvitationRequest = z.infer<typeof createInvitationSchema>;

export const acceptInvitationSchema = z.object({
  token: z.string({ message: 'expected the token from the e-mail link' }).min(1).max(200),
  name: personNameSchema.optional(),
  password: newPasswordSchema,
});
export type AcceptInvitationRequest = z.infer<typeof acceptInvitationSchema>;

export interface Invitation {
  id: number;
  email: string;
  name: string;
  role: Role;
  createdAt: string;
  expiresAt: string;
  acceptedAt: string | null;
}

/** What the public invitation page may show before the invitee has an account. */
export interface InvitationPreview {
  email: string;
  name: string;
  role: Role;
  labName: string;
  expiresAt: string;
}

export interface InvitationListResponse {
  invitations: Invitation[];
}
export interface InvitationCreatedResponse {
  invitation: Invitation;
}
