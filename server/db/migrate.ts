// npm run migrate: apply pending migrations to the configured database.
import { loadConfig } from '../config';
import { createDataSource } from './dataSource';

void (async () => {
  const cfg = loadConfig();
  const ds = createDataSource(cfg.db);
  await ds.initialize();
  const done = await ds.runMigrations({ transaction: 'each' });
  console.log(done.length ? `applied ${done.map((m) => m.name).join(', ')}` : 'no pending migrations');
  await ds.destroy();
})().catch((e) => {
  console.error(e);
  process.exit(1);
});
