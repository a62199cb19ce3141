import { EntitySchema } from 'typeorm';
import { createdAtColumn, fkColumn, idColumn, instant, sha256Column } from './columns';
import { UserEntity } from './User';

export interface PasswordResetRow {
  id: number;
  userId: number;
  tokenHash: string;
  createdAt: Date;
  expiresAt: Date;
  usedAt: Date | null;
}

export const PasswordResetEntity = new EntitySchema<PasswordResetRow>({
  name: 'PasswordReset',
  tableName: 'password_reset',
  columns: {
    id: idColumn,
    userId: fkColumn(),
    tokenHash: { ...sha256Column, unique: true },
    createdAt: createdAtColumn,
    expiresAt: instant(),
    usedAt: instant(true),
  },
  foreignKeys: [{ target: UserEntity, columnNames: ['userId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' }],
});
