import type { ErrorRequestHandler, RequestHandler } from 'express';
import type { ErrorCode, ValidationIssue } from '@/shared/api/common';

/** The one error type handlers throw; the error middleware turns it into { error: { code, message, details? } }. */
export class AppError extends Error {
  constructor(
    readonly status: number,
    readonly code: ErrorCode,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'AppError';
  }

  static validation(issues: ValidationIssue[], message?: string): AppError {
    const summary = message ?? issues.map((i) => `${i.path}: ${i.message}`).join('; ');
    return new AppError(400, 'VALIDATION_FAILED', summary, issues);
  }
  static unauthenticated(message = 'sign in first: missing or invalid bearer token'): AppError {
    return new AppError(401, 'UNAUTHENTICATED', message);
  }
  static forbidden(message = 'your role may not do this'): AppError {
    return new AppError(403, 'FORBIDDEN', message);
  }
  static notFound(message = 'not found'): AppError {
    return new AppError(404, 'NOT_FOUND', message);
  }
  static conflict(message: string, details?: unknown): AppError {
    return new AppError(409, 'CONFLICT', message, details);
  }
}

/** JSON 404 for any /api path no route claimed (never the SPA's HTML). */
export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(AppError.notFound(`no API route ${req.method} ${req.originalUrl.split('?')[0]}`));
};

interface BodyParserError extends Error {
  type?: string;
  status?: number;
  limit?: number;
  length?: number;
}

/** MySQL/MariaDB duplicate-key error, raised when two requests race past the service's own check. */
export function isDuplicateKey(err: unknown): boolean {
  return typeof err === 'object' && err !== null && (err as { code?: string }).code === 'ER_DUP_ENTRY';
}

export function errorMiddleware(log: (msg: string, err: unknown) => void = console.error): ErrorRequestHandler {
  return (err, req, res, _next) => {
    let appErr: AppError;
    const bp = err as BodyParserError;
    if (err instanceof AppError) {
      appErr = err;
    } else if (bp?.type === 'entity.parse.failed') {
      appErr = AppError.validation(
        [{ path: '(body)', message: `malformed JSON: ${bp.message}` }],
        `request body is not valid JSON: ${bp.message}`,
      );
    } else if (bp?.type === 'entity.too.large') {
      appErr = new AppError(
        413,
        'PAYLOAD_TOO_LARGE',
        `request body is ${bp.length ?? 'too many'} bytes; the limit is ${bp.limit} bytes`,
      );
    } else if (bp?.type === 'encoding.unsupported' || bp?.type === 'charset.unsupported') {
      appErr = new AppError(415, 'VALIDATION_FAILED', bp.message);
    } else if (isDuplicateKey(err)) {
      appErr = AppError.conflict('a record with the same unique value already exists');
    } else {
      log(`unhandled error on ${req.method} ${req.originalUrl}`, err);
      appErr = new AppError(500, 'INTERNAL', 'internal server error');
    }
    const body: { error: { code: string; message: string; details?: unknown } } = {
      error: { code: appErr.code, message: appErr.message },
    };
    if (appErr.details !== undefined) body.error.details = appErr.details;
    res.status(appErr.status).json(body);
  };
}
