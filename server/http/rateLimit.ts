import type { RequestHandler } from 'express';
import { rateLimit } from 'express-rate-limit';
import { AppError } from './errors';

/** Per-address limiter answering 429 RATE_LIMITED (RFC 6585 §4) with a Retry-After header. */
export function limiter(enabled: boolean, windowMs: number, limit: number, what: string): RequestHandler {
  if (!enabled) return (_req, _res, next) => next();
  return rateLimit({
    windowMs,
    limit,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    handler: (_req, res, next) => {
      const retry = res.getHeader('Retry-After');
      next(
        new AppError(429, 'RATE_LIMITED', `too many ${what} attempts; try again in ${retry ?? Math.ceil(windowMs / 1000)} s`),
      );
    },
  });
}
