// Writes a migration with the SQL TypeORM's schema builder would run to bring a database at
// the current migrations up to the entities. Run once per schema change against a scratch DB:
//   FW_DB_PORT=3417 npx tsx server/db/tools/generateMigration.ts Name
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { createConnection } from 'mysql2/promise';
import { loadConfig } from '../../config';
import { createDataSource } from '../dataSource';

async function main() {
  const name = process.argv[2];
  if (!name || !/^[A-Z][A-Za-z0-9]+$/.test(name)) throw new Error('usage: generateMigration.ts PascalCaseName');
  const cfg = loadConfig();
  const scratch = `fw_scratch_${process.pid}`;
  const admin = await createConnection({ host: cfg.db.host, port: cfg.db.port, user: cfg.db.username, password: cfg.db.password });
  await admin.query(`CREATE DATABASE \`${scratch}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  const ds = createDataSource({ ...cfg.db, database: scratch });
  try {
    await ds.initialize();
    await ds.runMigrations();
    const log = await ds.driver.createSchemaBuilder().log();
    if (log.upQueries.length === 0) {
      console.log('entities match the migrations: nothing to generate');
      return;
    }
    const ts = Date.now();
    const cls = `${name}${ts}`;
    const q = (s: string) => '`' + s.replace(/\\/g, '\\\\').replace(/`/g, '\\`').replace(/\$\{/g, '\\${') + '`';
    const up = log.upQueries.map((x) => `    await queryRunner.query(${q(x.query)});`).join('\n');
    const down = log.downQueries.reverse().map((x) => `    await queryRunner.query(${q(x.query)});`).join('\n');
    const body = `import type { MigrationInterface, QueryRunner } from 'typeorm';

export class ${cls} implements MigrationInterface {
  name = '${cls}';

  public async up(queryRunner: QueryRunner): Promise<void> {
${up}
  }

  public async down(queryRunner: QueryRunner): Promise<void> {
${down}
  }
}
`;
    const file = path.join(__dirname, '..', 'migrations', `${ts}-${name}.ts`);
    writeFileSync(file, body);
    console.log(`wrote ${file}; add ${cls} to server/db/migrations/index.ts`);
  } finally {
    if (ds.isInitialized) await ds.destroy();
    await admin.query(`DROP DATABASE IF EXISTS \`${scratch}\``);
    await admin.end();
  }
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
