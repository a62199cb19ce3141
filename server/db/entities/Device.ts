import { EntitySchema } from 'typeorm';
import type { Geometry } from '@/shared/api/devices';
import { createdAtColumn, fkColumn, idColumn, varchar } from './columns';
import { FabBatchEntity } from './FabBatch';
import { LabEntity } from './Lab';
import { UserEntity } from './User';

export interface DeviceRow {
  id: number;
  labId: number;
  batchId: number;
  name: string;
  chipPosition: string | null;
  geometry: Geometry;
  /** Design characteristic impedance of the CPW, ohm. */
  designZ0Ohm: number | null;
  /** Design bare resonance, Hz. */
  designFrequencyHz: number | null;
  /** Geometric SQUID loop inductance, H. */
  loopInductanceH: number | null;
  createdById: number | null;
  createdAt: Date;
}

export const DeviceEntity = new EntitySchema<DeviceRow>({
  name: 'Device',
  tableName: 'device',
  columns: {
    id: idColumn,
    labId: fkColumn(),
    batchId: fkColumn(),
    name: varchar(64),
    chipPosition: varchar(32, true),
    geometry: varchar(16),
    designZ0Ohm: { type: 'double', nullable: true },
    designFrequencyHz: { type: 'double', nullable: true },
    loopInductanceH: { type: 'double', nullable: true },
    createdById: fkColumn(true),
    createdAt: createdAtColumn,
  },
  uniques: [{ name: 'UQ_device_lab_name', columns: ['labId', 'name'] }],
  foreignKeys: [
    { target: LabEntity, columnNames: ['labId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
    // A batch with devices is history: refuse to delete it.
    { target: FabBatchEntity, columnNames: ['batchId'], referencedColumnNames: ['id'], onDelete: 'RESTRICT' },
    { target: UserEntity, columnNames: ['createdById'], referencedColumnNames: ['id'], onDelete: 'SET NULL' },
  ],
});
