import { DataSource } from 'typeorm';
import type { DbConfig } from '../config';
import { ENTITIES } from './entities';
import { MIGRATIONS } from './migrations';

/** Never synchronize: the schema comes only from the checked-in migrations. */
export function createDataSource(db: DbConfig, opts: { logging?: boolean } = {}): DataSource {
  return new DataSource({
    type: 'mariadb',
    host: db.host,
    port: db.port,
    username: db.username,
    password: db.password,
    database: db.database,
    charset: 'utf8mb4_unicode_ci',
    timezone: 'Z',
    entities: ENTITIES,
    migrations: MIGRATIONS,
    migrationsRun: false,
    migrationsTransactionMode: 'each',
    synchronize: false,
    logging: opts.logging ? ['query', 'error'] : ['error'],
  });
}
