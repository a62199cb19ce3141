import { EntitySchema } from 'typeorm';
import { createdAtColumn, fkColumn, idColumn, instant, sha256Column, varchar } from './columns';
import { UserEntity } from './User';

export interface ApiTokenRow {
  id: number;
  userId: number;
  name: string;
  tokenHash: string;
  scopes: string[];
  createdAt: Date;
  lastUsedAt: Date | null;
  revokedAt: Date | null;
}

export const ApiTokenEntity = new EntitySchema<ApiTokenRow>({
  name: 'ApiToken',
  tableName: 'api_token',
  columns: {
    id: idColumn,
    userId: fkColumn(),
    name: varchar(100),
    tokenHash: { ...sha256Column, unique: true },
    scopes: { type: 'json' },
    createdAt: createdAtColumn,
    lastUsedAt: instant(true),
    revokedAt: instant(true),
  },
  foreignKeys: [{ target: UserEntity, columnNames: ['userId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' }],
});
