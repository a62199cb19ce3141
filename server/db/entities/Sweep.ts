import { EntitySchema } from 'typeorm';
import type { FitOptions, ParseSummary } from '@/shared/api/calibration';
import type { InputKind } from '@/calibration/contract';
import { createdAtColumn, fkColumn, idColumn, sha256Column, varchar } from './columns';
import { CooldownEntity } from './Cooldown';
import { DeviceEntity } from './Device';
import { LabEntity } from './Lab';
import { UserEntity } from './User';

/** One uploaded measurement: metadata here, the file bytes in sweep_file (one row per file). */
export interface SweepRow {
  id: number;
  labId: number;
  deviceId: number;
  cooldownId: number | null;
  uploadedById: number | null;
  kind: InputKind;
  fileNames: string[];
  fileCount: number;
  byteSize: number;
  /** sha256 of the single file, or of the sorted "name:sha256" lines of a set. */
  sha256: string;
  biasUnit: string | null;
  parseSummary: ParseSummary;
  /** Options given with the upload; the first fit ran with these. */
  options: FitOptions;
  note: string | null;
  createdAt: Date;
}

export const SweepEntity = new EntitySchema<SweepRow>({
  name: 'Sweep',
  tableName: 'sweep',
  columns: {
    id: idColumn,
    labId: fkColumn(),
    deviceId: fkColumn(),
    cooldownId: fkColumn(true),
    uploadedById: fkColumn(true),
    kind: varchar(16),
    fileNames: { type: 'json' },
    fileCount: { type: 'int' },
    byteSize: { type: 'int' },
    sha256: sha256Column,
    biasUnit: varchar(32, true),
    parseSummary: { type: 'json' },
    options: { type: 'json' },
    note: { type: 'text', nullable: true },
    createdAt: createdAtColumn,
  },
  indices: [{ name: 'IDX_sweep_device', columns: ['deviceId', 'createdAt'] }],
  foreignKeys: [
    { target: LabEntity, columnNames: ['labId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
    { target: DeviceEntity, columnNames: ['deviceId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
    { target: CooldownEntity, columnNames: ['cooldownId'], referencedColumnNames: ['id'], onDelete: 'SET NULL' },
    { target: UserEntity, columnNames: ['uploadedById'], referencedColumnNames: ['id'], onDelete: 'SET NULL' },
  ],
});

/** The raw bytes of one file of a sweep, kept so any fit can be re-run from the original. */
export interface SweepFileRow {
  id: number;
  sweepId: number;
  /** Order of upload (0-based). */
  position: number;
  name: string;
  byteSize: number;
  sha256: string;
  content: Buffer;
}

export const SweepFileEntity = new EntitySchema<SweepFileRow>({
  name: 'SweepFile',
  tableName: 'sweep_file',
  columns: {
    id: idColumn,
    sweepId: fkColumn(),
    position: { type: 'int' },
    name: varchar(255),
    byteSize: { type: 'int' },
    sha256: sha256Column,
    content: { type: 'longblob', select: false },
  },
  uniques: [{ name: 'UQ_sweep_file_position', columns: ['sweepId', 'position'] }],
  foreignKeys: [{ target: SweepEntity, columnNames: ['sweepId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' }],
});
