// A whole Fluxwright server on a throwaway database, for API and browser tests.
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { randomBytes } from 'node:crypto';
import type { Express } from 'express';
import { createConnection } from 'mysql2/promise';
import type { DataSource } from 'typeorm';
import { createApp } from '@/server/app';
import { loadConfig, type Config, type RateLimitConfig } from '@/server/config';
import { createDataSource } from '@/server/db/dataSource';
import { MailMessageEntity, type MailMessageRow } from '@/server/db/entities';
import { seedDemo } from '@/server/db/seed';
import { startFakeSmtp } from '@/server/mail/fakeSmtp';
import { createSmtpMailer } from '@/server/mail/mailer';
import { ensureTestDb, TEST_DB } from './ensureTestDb';

export interface Mailbox {
  messages(): Promise<MailMessageRow[]>;
  /** Poll until a message satisfies pred; rejects after timeoutMs naming what arrived. */
  waitFor(pred: (m: MailMessageRow) => boolean, timeoutMs?: number): Promise<MailMessageRow>;
}

export interface TestServer {
  url: string;
  app: Express;
  dataSource: DataSource;
  config: Config;
  mailbox: Mailbox;
  database: string;
  close(): Promise<void>;
}

export interface TestServerOptions {
  seedDemo?: boolean;
  staticDir?: string;
  /** false/undefined: no rate limits; true: the defaults; an object: those limits. */
  rateLimit?: boolean | Partial<RateLimitConfig>;
  demoOutbox?: boolean;
  /** Overrides applied last (e.g. jwtExpiresInSeconds). */
  config?: Partial<Config>;
  /** Start on this existing database (as after a restart) instead of a fresh one; migrations still run. */
  database?: string;
  /** Leave the database in place on close() (a later server reuses it; that one's close drops it). */
  keepDatabase?: boolean;
  /** JWT secret of the server (a restarted server keeps accepting the earlier server's tokens). */
  jwtSecret?: string;
}

export async function startTestServer(opts: TestServerOptions = {}): Promise<TestServer> {
  await ensureTestDb();
  const database = opts.database ?? `fw_test_${process.pid}_${randomBytes(4).toString('hex')}`;
  if (!opts.database) {
    const admin = await createConnection(TEST_DB);
    await admin.query(`CREATE DATABASE \`${database}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
    await admin.end();
  }
  const dropOrKeep = (ds: DataSource) => (opts.keepDatabase ? (ds.isInitialized ? ds.destroy() : Promise.resolve()) : dropDatabase(ds, database));

  const base = loadConfig({
    FW_JWT_SECRET: opts.jwtSecret ?? randomBytes(32).toString('hex'),
    FW_DB_PORT: String(TEST_DB.port),
    FW_DB_USER: TEST_DB.user,
    FW_DB_PASSWORD: TEST_DB.password,
    FW_DB_NAME: database,
    FW_BCRYPT_COST: '4', // bcrypt's minimum: keeps tests fast; production default is 10
  });
  const rl = opts.rateLimit;
  const config: Config = {
    ...base,
    demoOutbox: opts.demoOutbox ?? true,
    rateLimit: { ...base.rateLimit, enabled: !!rl, ...(typeof rl === 'object' ? rl : {}) },
    ...opts.config,
  };

  const dataSource = createDataSource(config.db);
  await dataSource.initialize();
  const cleanups: Array<() => Promise<unknown>> = [];
  try {
    await dataSource.runMigrations({ transaction: 'each' });
    if (opts.seedDemo) await seedDemo(dataSource, { bcryptCost: config.bcryptCost });
    const smtp = await startFakeSmtp({ dataSource, port: 0 });
    cleanups.push(() => smtp.close());
    config.smtp = { ...config.smtp, host: '127.0.0.1', port: smtp.port, secure: false };
    const mailer = createSmtpMailer(config);
    cleanups.push(() => mailer.close());
    const app = createApp({ dataSource, mailer, config, log: () => undefined }, { staticDir: opts.staticDir });
    const server: Server = await new Promise((resolve, reject) => {
      const s = app.listen(0, '127.0.0.1', () => resolve(s));
      s.once('error', reject);
    });
    cleanups.push(
      () =>
        new Promise<void>((resolve) => {
          server.closeAllConnections?.();
          server.close(() => resolve());
        }),
    );
    const port = (server.address() as AddressInfo).port;
    config.appUrl = `http://127.0.0.1:${port}`;

    const mailbox: Mailbox = {
      messages: () => dataSource.getRepository(MailMessageEntity).find({ order: { id: 'ASC' } }),
      async waitFor(pred, timeoutMs = 5000) {
        const until = Date.now() + timeoutMs;
        for (;;) {
          const all = await mailbox.messages();
          const hit = all.find(pred);
          if (hit) return hit;
          if (Date.now() > until) {
            throw new Error(`no matching e-mail within ${timeoutMs} ms; got: ${JSON.stringify(all.map((m) => [m.to, m.subject]))}`);
          }
          await new Promise((r) => setTimeout(r, 50));
        }
      },
    };

    return {
      url: config.appUrl,
      app,
      dataSource,
      config,
      mailbox,
      database,
      async close() {
        for (const c of cleanups.reverse()) await c().catch(() => undefined);
        await dropOrKeep(dataSource);
      },
    };
  } catch (e) {
    for (const c of cleanups.reverse()) await c().catch(() => undefined);
    await dropOrKeep(dataSource);
    throw e;
  }
}

async function dropDatabase(ds: DataSource, database: string): Promise<void> {
  if (ds.isInitialized) await ds.destroy();
  const admin = await createConnection(TEST_DB);
  await admin.query(`DROP DATABASE IF EXISTS \`${database}\``);
  await admin.end();
}
