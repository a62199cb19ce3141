import { z } from 'zod';
import { emailSchema, newPasswordSchema, type Role } from './common';

/** User as every endpoint returns it. */
export interface User {
  id: number;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  labId: number;
  labName: string;
}

export const signInRequestSchema = z.object({
  email: emailSchema,
  password: z.string({ message: 'expected a password' }).min(1, { message: 'password must not be empty' }).max(1000),
});
export type SignInRequest = z.infer<typeof signInRequestSchema>;

/** Answer of sign-in and of invitation accept: a bearer token and who it belongs to. */
export interface SessionResponse {
  token: string;
  /** ISO 8601 instant at which the token's exp claim falls. */
  expiresAt: string;
  user: User;
}

export interface MeResponse {
  user: User;
}

export const passwordResetRequestSchema = z.object({ email: emailSchema });
export type PasswordResetRequest = z.infer<typeof passwordResetRequestSchema>;

export const passwordResetConfirmSchema = z.object({
  token: z.string({ message: 'expected the token from the e-mail link' }).min(1).max(200),
  password: newPasswordSchema,
});
export type PasswordResetConfirm = z.infer<typeof passwordResetConfirmSchema>;

export interface OkResponse {
  ok: true;
}
