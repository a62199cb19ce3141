import { EntitySchema } from 'typeorm';
import { createdAtColumn, idColumn, varchar } from './columns';

export interface LabRow {
  id: number;
  name: string;
  createdAt: Date;
}

export const LabEntity = new EntitySchema<LabRow>({
  name: 'Lab',
  tableName: 'lab',
  columns: { id: idColumn, name: { ...varchar(120), unique: true }, createdAt: createdAtColumn },
});
