import { EntitySchema } from 'typeorm';
import type { PlanMode, PlanRequest, PlanResult } from '@/calibration/planner/types';
import type { PumpLine } from '@/shared/api/planning';
import { createdAtColumn, fkColumn, idColumn, varchar } from './columns';
import { DeviceEntity } from './Device';
import { FitEntity } from './Fit';
import { LabEntity } from './Lab';
import { UserEntity } from './User';

/**
 * A saved drive plan: the request the core computed with, its whole result, the fit it used and the
 * pump line as used. Immutable after insert (a trigger in the migration refuses every UPDATE); a
 * re-plan is a new row whose replannedFromId names the old one.
 */
export interface PlanRow {
  id: number;
  labId: number;
  deviceId: number;
  fitId: number;
  authorId: number | null;
  mode: PlanMode;
  request: PlanRequest;
  result: PlanResult;
  pumpLine: PumpLine | null;
  filledFromPumpLine: string[];
  /** Headline numbers as columns, for lists without reading the result JSON. */
  predictedPairRate: number;
  pumpFrequencyHz: number;
  pumpAmplitudePhi0: number;
  generatorPowerDbm: number | null;
  coreVersion: string;
  replannedFromId: number | null;
  createdAt: Date;
}

export const PlanEntity = new EntitySchema<PlanRow>({
  name: 'Plan',
  tableName: 'plan',
  columns: {
    id: idColumn,
    labId: fkColumn(),
    deviceId: fkColumn(),
    fitId: fkColumn(),
    authorId: fkColumn(true),
    mode: varchar(8),
    request: { type: 'json' },
    result: { type: 'json' },
    pumpLine: { type: 'json', nullable: true },
    filledFromPumpLine: { type: 'json' },
    predictedPairRate: { type: 'double' },
    pumpFrequencyHz: { type: 'double' },
    pumpAmplitudePhi0: { type: 'double' },
    generatorPowerDbm: { type: 'double', nullable: true },
    coreVersion: varchar(32),
    replannedFromId: fkColumn(true),
    createdAt: createdAtColumn,
  },
  indices: [
    { name: 'IDX_plan_device_created', columns: ['deviceId', 'createdAt'] },
    { name: 'IDX_plan_lab_created', columns: ['labId', 'createdAt'] },
  ],
  foreignKeys: [
    { target: LabEntity, columnNames: ['labId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
    { target: DeviceEntity, columnNames: ['deviceId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
    // The fit is the plan's evidence: refuse to delete it while plans use it.
    { target: FitEntity, columnNames: ['fitId'], referencedColumnNames: ['id'], onDelete: 'RESTRICT' },
    { target: UserEntity, columnNames: ['authorId'], referencedColumnNames: ['id'], onDelete: 'SET NULL' },
    { target: 'Plan', columnNames: ['replannedFromId'], referencedColumnNames: ['id'], onDelete: 'SET NULL' },
  ],
});

/** An annotation on a plan (the plan itself never changes). */
export interface PlanNoteRow {
  id: number;
  planId: number;
  authorId: number | null;
  text: string;
  createdAt: Date;
}

export const PlanNoteEntity = new EntitySchema<PlanNoteRow>({
  name: 'PlanNote',
  tableName: 'plan_note',
  columns: {
    id: idColumn,
    planId: fkColumn(),
    authorId: fkColumn(true),
    text: { type: 'text' },
    createdAt: createdAtColumn,
  },
  indices: [{ name: 'IDX_plan_note_plan', columns: ['planId', 'createdAt'] }],
  foreignKeys: [
    { target: PlanEntity, columnNames: ['planId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
    { target: UserEntity, columnNames: ['authorId'], referencedColumnNames: ['id'], onDelete: 'SET NULL' },
  ],
});
