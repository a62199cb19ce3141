import { EntitySchema } from 'typeorm';
import type { Role } from '@/shared/api/common';
import { createdAtColumn, fkColumn, idColumn, instant, sha256Column, varchar } from './columns';
import { LabEntity } from './Lab';
import { UserEntity } from './User';

export interface InvitationRow {
  id: number;
  labId: number;
  email: string;
  name: string;
  role: Role;
  /** SHA-256 of the secret sent in the e-mail link; the secret itself is never stored. */
  tokenHash: string;
  invitedById: number | null;
  acceptedUserId: number | null;
  createdAt: Date;
  expiresAt: Date;
  acceptedAt: Date | null;
}

export const InvitationEntity = new EntitySchema<InvitationRow>({
  name: 'Invitation',
  tableName: 'invitation',
  columns: {
    id: idColumn,
    labId: fkColumn(),
    email: varchar(254),
    name: varchar(120),
    role: varchar(32),
    tokenHash: { ...sha256Column, unique: true },
    invitedById: fkColumn(true),
    acceptedUserId: fkColumn(true),
    createdAt: createdAtColumn,
    expiresAt: instant(),
    acceptedAt: instant(true),
  },
  foreignKeys: [
    { target: LabEntity, columnNames: ['labId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
    { target: UserEntity, columnNames: ['invitedById'], referencedColumnNames: ['id'], onDelete: 'SET NULL' },
    { target: UserEntity, columnNames: ['acceptedUserId'], referencedColumnNames: ['id'], onDelete: 'SET NULL' },
  ],
});
