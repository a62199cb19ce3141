import { EntitySchema } from 'typeorm';
import type { FitOptions, JobStatus, JobType } from '@/shared/api/calibration';
import { createdAtColumn, fkColumn, idColumn, instant, updatedAtColumn, varchar } from './columns';
import { LabEntity } from './Lab';
import { SweepEntity } from './Sweep';
import { UserEntity } from './User';

/**
 * A background fit. State lives here, not in memory, so progress and results survive a restart:
 * on start the server re-queues jobs left queued/running (the sweep's bytes are stored).
 */
export interface JobRow {
  id: number;
  labId: number;
  type: JobType;
  status: JobStatus;
  progress: number;
  message: string | null;
  sweepId: number;
  fitId: number | null;
  /** Options the fit runs with. */
  options: FitOptions;
  /** The fit this refit started from (refit jobs). */
  sourceFitId: number | null;
  attempts: number;
  createdById: number | null;
  createdAt: Date;
  startedAt: Date | null;
  finishedAt: Date | null;
  updatedAt: Date;
}

export const JobEntity = new EntitySchema<JobRow>({
  name: 'Job',
  tableName: 'job',
  columns: {
    id: idColumn,
    labId: fkColumn(),
    type: varchar(16),
    status: varchar(16),
    progress: { type: 'double', default: 0 },
    message: varchar(2000, true),
    sweepId: fkColumn(),
    fitId: fkColumn(true),
    options: { type: 'json' },
    sourceFitId: fkColumn(true),
    attempts: { type: 'int', default: 0 },
    createdById: fkColumn(true),
    createdAt: createdAtColumn,
    startedAt: instant(true),
    finishedAt: instant(true),
    updatedAt: updatedAtColumn,
  },
  indices: [{ name: 'IDX_job_status', columns: ['status'] }],
  foreignKeys: [
    { target: LabEntity, columnNames: ['labId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
    { target: SweepEntity, columnNames: ['sweepId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
    { target: UserEntity, columnNames: ['createdById'], referencedColumnNames: ['id'], onDelete: 'SET NULL' },
  ],
});
