// One process: migrations, optional demo seed, local mail sink, the API and the web export.
import 'reflect-metadata';
import { existsSync } from 'node:fs';
import path from 'node:path';
import { createApp } from './app';
import { loadConfig, REPO_ROOT } from './config';
import { createDataSource } from './db/dataSource';
import { DEMO_LAB_NAME, DEMO_USERS, seedDemo } from './db/seed';
import { startFakeSmtp, type FakeSmtp } from './mail/fakeSmtp';
import { createSmtpMailer } from './mail/mailer';
import { JobRunner } from './jobs/runner';

function flag(name: string, fallback: boolean): boolean {
  const v = process.env[name];
  return v === undefined || v === '' ? fallback : /^(1|true|yes|on)$/i.test(v);
}

async function main() {
  const config = loadConfig();
  const seed = flag('FW_SEED_DEMO', true);
  // The local SMTP sink runs unless a real relay is configured.
  const fakeSmtpOn = flag('FW_FAKE_SMTP', !process.env.FW_SMTP_HOST);
  const staticDir = process.env.FW_STATIC_DIR || path.join(REPO_ROOT, 'dist');

  const dataSource = createDataSource(config.db);
  await dataSource.initialize();
  const applied = await dataSource.runMigrations({ transaction: 'each' });
  if (applied.length) console.log(`[db] applied migrations: ${applied.map((m) => m.name).join(', ')}`);
  if (seed) {
    const r = await seedDemo(dataSource, { bcryptCost: config.bcryptCost });
    console.log(r.created ? `[db] seeded ${DEMO_LAB_NAME}` : `[db] ${DEMO_LAB_NAME} already there (not seeded again)`);
  }

  let smtp: FakeSmtp | undefined;
  if (fakeSmtpOn) {
    smtp = await startFakeSmtp({ dataSource, host: config.smtp.host, port: config.smtp.port });
    console.log(`[mail] local SMTP sink on ${config.smtp.host}:${smtp.port} (messages in the outbox)`);
  }
  const mailer = createSmtpMailer(config);
  if (!existsSync(staticDir)) console.warn(`[web] ${staticDir} missing: serving the API only (build with npm run web:export)`);
  const jobs = new JobRunner({ dataSource, mailer, config });
  const app = createApp({ dataSource, mailer, config, jobs }, { staticDir: existsSync(staticDir) ? staticDir : undefined });

  const server = app.listen(config.port, config.host, () => {
    console.log(`\nFluxwright ${config.version} on http://${config.host}:${config.port}`);
    if (seed) {
      console.log(`Demo sign-ins (${DEMO_LAB_NAME}):`);
      for (const u of DEMO_USERS) console.log(`  ${u.role.padEnd(16)} ${u.email.padEnd(38)} ${u.password}`);
    }
    if (config.demoOutbox) console.log('Outbox (caught e-mail) is visible to the lab lead.');
  });
  // Fits a stopped server left queued or running start again (the sweeps' bytes are stored).
  const resumed = await jobs.resume();
  if (resumed.length) console.log(`[jobs] resumed ${resumed.length} fit job(s): ${resumed.join(', ')}`);
  jobs.warm();
  server.on('error', (e) => {
    console.error(`[http] cannot listen on ${config.host}:${config.port}: ${e.message}`);
    process.exit(1);
  });

  const shutdown = async () => {
    server.close();
    await jobs.close();
    await smtp?.close();
    await mailer.close();
    await dataSource.destroy();
    process.exit(0);
  };
  process.on('SIGINT', shutdown);
  process.on('SIGTERM', shutdown);
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
