import { z } from 'zod';

/** Prefix that tells API tokens apart from JWTs in the Authorization header. */
export const API_TOKEN_PREFIX = 'fwt_';

export const createApiTokenSchema = z.object({
  name: z
    .string({ message: 'expected a token name' })
    .trim()
    .min(1, { message: 'name must not be empty' })
    .max(100, { message: 'name must be at most 100 characters' }),
  scopes: z
    .array(
      z
        .string({ message: 'expected a scope name' })
        .regex(/^[a-z][a-z0-9:_-]{0,63}$/, { message: 'scope must be lower-case letters, digits, ":", "_" or "-"' }),
      { message: 'expected a list of scope names' },
    )
    .max(20, { message: 'at most 20 scopes' })
    .optional(),
});
export type CreateApiTokenRequest = z.infer<typeof createApiTokenSchema>;

export interface ApiToken {
  id: number;
  name: string;
  scopes: string[];
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
}

export interface ApiTokenListResponse {
  tokens: ApiToken[];
}
export interface ApiTokenCreatedResponse {
  /** The secret, shown only in this answer; the server keeps its SHA-256 hash. */
  token: string;
  apiToken: ApiToken;
}
