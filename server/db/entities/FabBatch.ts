import { EntitySchema } from 'typeorm';
import { createdAtColumn, fkColumn, idColumn, varchar } from './columns';
import { LabEntity } from './Lab';
import { UserEntity } from './User';

export interface FabBatchRow {
  id: number;
  labId: number;
  code: string;
  wafer: string | null;
  processNotes: string | null;
  /** YYYY-MM-DD (TypeORM returns date columns as strings on MariaDB). */
  fabricatedOn: string | null;
  createdById: number | null;
  createdAt: Date;
}

export const FabBatchEntity = new EntitySchema<FabBatchRow>({
  name: 'FabBatch',
  tableName: 'fab_batch',
  columns: {
    id: idColumn,
    labId: fkColumn(),
    code: varchar(64),
    wafer: varchar(64, true),
    processNotes: { type: 'text', nullable: true },
    fabricatedOn: { type: 'date', nullable: true },
    createdById: fkColumn(true),
    createdAt: createdAtColumn,
  },
  uniques: [{ name: 'UQ_fab_batch_lab_code', columns: ['labId', 'code'] }],
  foreignKeys: [
    { target: LabEntity, columnNames: ['labId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
    { target: UserEntity, columnNames: ['createdById'], referencedColumnNames: ['id'], onDelete: 'SET NULL' },
  ],
});
