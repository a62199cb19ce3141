import { z } from 'zod';
import { roleSchema } from './common';
import type { User } from './auth';

export const updateUserSchema = z
  .object({
    role: roleSchema.optional(),
    active: z.boolean({ message: 'expected true or false' }).optional(),
  })
  .strict()
  .refine((v) => v.role !== undefined || v.active !== undefined, {
    message: 'give role, active or both',
  });
export type UpdateUserRequest = z.infer<typeof updateUserSchema>;

export interface UserListResponse {
  users: User[];
}
export interface UserResponse {
  user: User;
}
