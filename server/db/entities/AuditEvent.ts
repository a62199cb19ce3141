import { EntitySchema } from 'typeorm';
import { createdAtColumn, fkColumn, idColumn, varchar } from './columns';
import { LabEntity } from './Lab';
import { UserEntity } from './User';

export interface AuditEventRow {
  id: number;
  labId: number | null;
  actorId: number | null;
  action: string;
  subjectType: string | null;
  subjectId: string | null;
  details: Record<string, unknown> | null;
  createdAt: Date;
}

export const AuditEventEntity = new EntitySchema<AuditEventRow>({
  name: 'AuditEvent',
  tableName: 'audit_event',
  columns: {
    id: idColumn,
    labId: fkColumn(true),
    actorId: fkColumn(true),
    action: varchar(64),
    subjectType: varchar(32, true),
    subjectId: varchar(64, true),
    details: { type: 'json', nullable: true },
    createdAt: createdAtColumn,
  },
  foreignKeys: [
    { target: LabEntity, columnNames: ['labId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
    // The trail outlives the people in it: a deleted actor leaves a null.
    { target: UserEntity, columnNames: ['actorId'], referencedColumnNames: ['id'], onDelete: 'SET NULL' },
  ],
});
