import { EntitySchema } from 'typeorm';
import { fkColumn, idColumn, updatedAtColumn, varchar } from './columns';
import { LabEntity } from './Lab';
import { UserEntity } from './User';

/** The lab's acceptance window for one calibration parameter (either bound may be open). */
export interface SpecWindowRow {
  id: number;
  labId: number;
  param: string;
  min: number | null;
  max: number | null;
  updatedById: number | null;
  updatedAt: Date;
}

export const SpecWindowEntity = new EntitySchema<SpecWindowRow>({
  name: 'SpecWindow',
  tableName: 'spec_window',
  columns: {
    id: idColumn,
    labId: fkColumn(),
    param: varchar(64),
    min: { type: 'double', nullable: true },
    max: { type: 'double', nullable: true },
    updatedById: fkColumn(true),
    updatedAt: updatedAtColumn,
  },
  uniques: [{ name: 'UQ_spec_window_lab_param', columns: ['labId', 'param'] }],
  foreignKeys: [
    { target: LabEntity, columnNames: ['labId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
    { target: UserEntity, columnNames: ['updatedById'], referencedColumnNames: ['id'], onDelete: 'SET NULL' },
  ],
});
