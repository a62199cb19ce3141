import { randomBytes } from 'node:crypto';
import { availableParallelism } from 'node:os';
import { chmodSync, existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';

export interface DbConfig {
  host: string;
  port: number;
  username: string;
  password: string;
  database: string;
}

export interface SmtpConfig {
  host: string;
  port: number;
  user?: string;
  pass?: string;
  /** Implicit TLS (port 465 style); STARTTLS is negotiated by nodemailer when offered. */
  secure: boolean;
}

export interface RateLimitConfig {
  enabled: boolean;
  windowMs: number;
  /** Attempts per window and client address for POST /api/auth/sign-in. */
  signIn: number;
  /** Attempts per window and client address for the password-reset routes. */
  passwordReset: number;
}

export interface Config {
  version: string;
  host: string;
  port: number;
  /** Origin the e-mailed links point at, e.g. http://127.0.0.1:8080 (no trailing slash). */
  appUrl: string;
  jwtSecret: string;
  jwtExpiresInSeconds: number;
  bcryptCost: number;
  jsonLimit: string;
  rateLimit: RateLimitConfig;
  /** GET /api/outbox shows caught mail to lab leads. Demo and tests only. */
  demoOutbox: boolean;
  mailFrom: string;
  smtp: SmtpConfig;
  db: DbConfig;
  invitationTtlMs: number;
  passwordResetTtlMs: number;
  /** Largest sweep upload (each file and the whole set), MB (FW_UPLOAD_LIMIT_MB). */
  uploadLimitMb: number;
  /** Worker threads for parsing and fitting (FW_WORKERS; default min(2, cores)). */
  workers: number;
  /** How long an upload or refit request waits for its fit before answering 202, ms. */
  fitWaitMs: number;
  /** A fit job still running after this long is stopped and failed, ms (FW_FIT_TIMEOUT_S). */
  fitTimeoutMs: number;
}

type Env = Record<string, string | undefined>;

function int(env: Env, name: string, fallback: number): number {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 0) throw new Error(`${name} must be a non-negative integer, got "${raw}"`);
  return n;
}

function bool(env: Env, name: string, fallback: boolean): boolean {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  if (/^(1|true|yes|on)$/i.test(raw)) return true;
  if (/^(0|false|no|off)$/i.test(raw)) return false;
  throw new Error(`${name} must be 1/0 or true/false, got "${raw}"`);
}

/** FW_JWT_SECRET, or a secret generated once and kept in .data/jwt-secret (mode 0600). */
export function resolveJwtSecret(env: Env, dataDir: string): string {
  if (env.FW_JWT_SECRET) {
    if (env.FW_JWT_SECRET.length < 32) throw new Error('FW_JWT_SECRET must have at least 32 characters');
    return env.FW_JWT_SECRET;
  }
  const file = path.join(dataDir, 'jwt-secret');
  if (existsSync(file)) {
    const s = readFileSync(file, 'utf8').trim();
    if (s.length >= 32) return s;
  }
  mkdirSync(dataDir, { recursive: true });
  const secret = randomBytes(48).toString('base64url');
  writeFileSync(file, secret + '\n', { mode: 0o600 });
  chmodSync(file, 0o600);
  return secret;
}

export const REPO_ROOT = path.resolve(__dirname, '..');

function packageVersion(): string {
  try {
    return JSON.parse(readFileSync(path.join(REPO_ROOT, 'package.json'), 'utf8')).version ?? '0.0.0';
  } catch {
    return '0.0.0';
  }
}

export function loadConfig(env: Env = process.env): Config {
  const port = int(env, 'PORT', 8080);
  const host = env.HOST || '127.0.0.1';
  const dataDir = env.FW_DATA_DIR || path.join(REPO_ROOT, '.data');
  return {
    version: packageVersion(),
    host,
    port,
    appUrl: (env.FW_APP_URL || `http://${host}:${port}`).replace(/\/+$/, ''),
    jwtSecret: resolveJwtSecret(env, dataDir),
    jwtExpiresInSeconds: int(env, 'FW_JWT_EXPIRES_IN_S', 12 * 3600),
    bcryptCost: int(env, 'FW_BCRYPT_COST', 10),
    jsonLimit: env.FW_JSON_LIMIT || '1mb',
    rateLimit: {
      enabled: bool(env, 'FW_RATE_LIMIT', true),
      windowMs: int(env, 'FW_RATE_LIMIT_WINDOW_MS', 15 * 60 * 1000),
      signIn: int(env, 'FW_RATE_LIMIT_SIGN_IN', 20),
      passwordReset: int(env, 'FW_RATE_LIMIT_PASSWORD_RESET', 10),
    },
    demoOutbox: bool(env, 'FW_DEMO_OUTBOX', false),
    mailFrom: env.FW_MAIL_FROM || 'Fluxwright <no-reply@fluxwright.test>',
    smtp: {
      host: env.FW_SMTP_HOST || '127.0.0.1',
      port: int(env, 'FW_SMTP_PORT', 2525),
      user: env.FW_SMTP_USER || undefined,
      pass: env.FW_SMTP_PASS || undefined,
      secure: bool(env, 'FW_SMTP_SECURE', false),
    },
    db: {
      host: env.FW_DB_HOST || '127.0.0.1',
      port: int(env, 'FW_DB_PORT', 3407),
      username: env.FW_DB_USER || 'fluxwright',
      password: env.FW_DB_PASSWORD ?? 'fluxwright-local',
      database: env.FW_DB_NAME || 'fluxwright',
    },
    invitationTtlMs: 7 * 24 * 3600 * 1000,
    passwordResetTtlMs: 3600 * 1000,
    uploadLimitMb: int(env, 'FW_UPLOAD_LIMIT_MB', 60),
    workers: Math.max(1, int(env, 'FW_WORKERS', Math.min(2, availableParallelism()))),
    fitWaitMs: int(env, 'FW_FIT_WAIT_MS', 1500),
    fitTimeoutMs: int(env, 'FW_FIT_TIMEOUT_S', 300) * 1000,
  };
}
