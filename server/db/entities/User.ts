import { EntitySchema } from 'typeorm';
import type { Role } from '@/shared/api/common';
import { createdAtColumn, fkColumn, idColumn, updatedAtColumn, varchar } from './columns';
import { LabEntity } from './Lab';

export interface UserRow {
  id: number;
  labId: number;
  email: string;
  name: string;
  passwordHash: string;
  role: Role;
  active: boolean;
  createdAt: Date;
  updatedAt: Date;
}

export const UserEntity = new EntitySchema<UserRow>({
  name: 'User',
  tableName: 'user',
  columns: {
    id: idColumn,
    labId: fkColumn(),
    // E-mail is the sign-in name, so it is unique across labs (stored lower-case).
    email: { ...varchar(254), unique: true },
    name: varchar(120),
    passwordHash: varchar(100),
    role: varchar(32),
    active: { type: 'boolean', default: true },
    createdAt: createdAtColumn,
    updatedAt: updatedAtColumn,
  },
  foreignKeys: [{ target: LabEntity, columnNames: ['labId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' }],
});
