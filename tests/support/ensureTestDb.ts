import { execFileSync } from 'node:child_process';
import path from 'node:path';
import { createConnection } from 'mysql2/promise';

export const TEST_DB = {
  host: '127.0.0.1',
  port: Number(process.env.FW_DB_PORT || 3417),
  user: process.env.FW_DB_USER || 'fluxwright',
  password: process.env.FW_DB_PASSWORD ?? 'fluxwright-local',
};

const ROOT = path.resolve(__dirname, '..', '..');

async function answers(): Promise<boolean> {
  try {
    const c = await createConnection({ ...TEST_DB, connectTimeout: 2000 });
    await c.ping();
    await c.end();
    return true;
  } catch {
    return false;
  }
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/** Drop throwaway databases left by test processes that died before their close() ran. */
async function dropOrphans(): Promise<void> {
  const c = await createConnection(TEST_DB);
  try {
    const [rows] = await c.query("SHOW DATABASES LIKE 'fw\\_test\\_%'");
    for (const r of rows as Array<Record<string, string>>) {
      const name = Object.values(r)[0];
      const pid = Number(/^fw_test_(\d+)_/.exec(name)?.[1]);
      if (pid && pid !== process.pid && !alive(pid)) await c.query(`DROP DATABASE IF EXISTS \`${name}\``);
    }
  } finally {
    await c.end();
  }
}

let ready: Promise<void> | undefined;

/**
 * Make sure the test MariaDB (FW_DB_PORT, default 3417, data in .data/test-mariadb) answers;
 * starts it with scripts/db.sh when it does not, so `npx jest tests/api` works on its own.
 */
export function ensureTestDb(): Promise<void> {
  ready ??= (async () => {
    if (await answers()) return dropOrphans();
    execFileSync('bash', [path.join(ROOT, 'scripts', 'db.sh'), 'start'], {
      cwd: ROOT,
      env: { ...process.env, FW_DB_DIR: process.env.FW_DB_DIR || '.data/test-mariadb', FW_DB_PORT: String(TEST_DB.port) },
      stdio: ['ignore', 'inherit', 'inherit'],
    });
    if (!(await answers())) throw new Error(`test MariaDB on 127.0.0.1:${TEST_DB.port} still not answering after db.sh start`);
    await dropOrphans();
  })();
  return ready;
}
