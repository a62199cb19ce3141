import type { z } from 'zod';
import type { ValidationIssue } from '@/shared/api/common';
import { AppError } from './errors';

/**
 * Parse one part of the request; on failure a 400 naming every offending field.
 * `where` prefixes query and path parameters ("query.batch", "params.id"); body fields stay bare ("email").
 */
export function parse<S extends z.ZodType>(schema: S, value: unknown, where: 'body' | 'query' | 'params' = 'body'): z.infer<S> {
  const r = schema.safeParse(value === undefined && where === 'body' ? {} : value);
  if (r.success) return r.data;
  const prefix = where === 'body' ? '' : `${where}.`;
  const issues: ValidationIssue[] = r.error.issues.map((i) => ({
    path: prefix + (i.path.length ? i.path.map(String).join('.') : `(${where})`),
    message: i.message,
  }));
  throw AppError.validation(issues);
}
