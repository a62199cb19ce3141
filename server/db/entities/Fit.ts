import { EntitySchema } from 'typeorm';
import type { CalibrationJson, InputKind, ModelName } from '@/calibration/contract';
import type { FitOptions, FitStatus } from '@/shared/api/calibration';
import { createdAtColumn, fkColumn, idColumn, instant, varchar } from './columns';
import { DeviceEntity } from './Device';
import { LabEntity } from './Lab';
import { SweepEntity } from './Sweep';
import { UserEntity } from './User';

/**
 * One fit of one sweep: the whole calibration JSON plus the columns lists and filters need.
 * Immutable after insert except status and the review/supersede fields (a trigger in the
 * migration enforces this in the database as well).
 */
export interface FitRow {
  id: number;
  labId: number;
  deviceId: number;
  sweepId: number;
  /** 1, 2, 3 … per device; unique with deviceId. */
  version: number;
  kind: InputKind;
  model: ModelName;
  options: FitOptions;
  calibration: CalibrationJson;
  f0Hz: number | null;
  gamma0: number | null;
  asymmetry: number | null;
  redchi: number | null;
  ndata: number;
  outlierCount: number;
  success: boolean;
  coreVersion: string;
  status: FitStatus;
  createdById: number | null;
  createdAt: Date;
  reviewedById: number | null;
  reviewedAt: Date | null;
  reviewComment: string | null;
  supersededByFitId: number | null;
  supersededAt: Date | null;
}

export const FitEntity = new EntitySchema<FitRow>({
  name: 'Fit',
  tableName: 'fit',
  columns: {
    id: idColumn,
    labId: fkColumn(),
    deviceId: fkColumn(),
    sweepId: fkColumn(),
    version: { type: 'int' },
    kind: varchar(16),
    model: varchar(16),
    options: { type: 'json' },
    calibration: { type: 'json' },
    f0Hz: { type: 'double', nullable: true },
    gamma0: { type: 'double', nullable: true },
    asymmetry: { type: 'double', nullable: true },
    redchi: { type: 'double', nullable: true },
    ndata: { type: 'int' },
    outlierCount: { type: 'int' },
    success: { type: 'boolean' },
    coreVersion: varchar(32),
    status: varchar(16),
    createdById: fkColumn(true),
    createdAt: createdAtColumn,
    reviewedById: fkColumn(true),
    reviewedAt: instant(true),
    reviewComment: { type: 'text', nullable: true },
    supersededByFitId: fkColumn(true),
    supersededAt: instant(true),
  },
  uniques: [{ name: 'UQ_fit_device_version', columns: ['deviceId', 'version'] }],
  indices: [{ name: 'IDX_fit_device_status', columns: ['deviceId', 'status'] }],
  foreignKeys: [
    { target: LabEntity, columnNames: ['labId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
    { target: DeviceEntity, columnNames: ['deviceId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
    // A sweep with fits is the evidence behind them: refuse to delete it.
    { target: SweepEntity, columnNames: ['sweepId'], referencedColumnNames: ['id'], onDelete: 'RESTRICT' },
    { target: UserEntity, columnNames: ['createdById'], referencedColumnNames: ['id'], onDelete: 'SET NULL' },
    { target: UserEntity, columnNames: ['reviewedById'], referencedColumnNames: ['id'], onDelete: 'SET NULL' },
  ],
});
