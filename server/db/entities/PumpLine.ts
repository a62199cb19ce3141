import { EntitySchema } from 'typeorm';
import { fkColumn, idColumn, updatedAtColumn } from './columns';
import { DeviceEntity } from './Device';
import { LabEntity } from './Lab';
import { UserEntity } from './User';

/** The pump line of one device as the lab measured it (one row per device; replaced on PUT). */
export interface PumpLineRow {
  id: number;
  labId: number;
  deviceId: number;
  /** dc flux period through the pump line, A per Φ0. */
  dcPeriod: number | null;
  /** dB, warm → cold. */
  attenuationDb: number[];
  stageNames: string[];
  thresholdPowerDbm: number | null;
  thresholdBias: number | null;
  coldStageLimitW: number;
  pumpLineZ0Ohm: number;
  note: string | null;
  updatedById: number | null;
  updatedAt: Date;
}

export const PumpLineEntity = new EntitySchema<PumpLineRow>({
  name: 'PumpLine',
  tableName: 'pump_line',
  columns: {
    id: idColumn,
    labId: fkColumn(),
    deviceId: fkColumn(),
    dcPeriod: { type: 'double', nullable: true },
    attenuationDb: { type: 'json' },
    stageNames: { type: 'json' },
    thresholdPowerDbm: { type: 'double', nullable: true },
    thresholdBias: { type: 'double', nullable: true },
    coldStageLimitW: { type: 'double' },
    pumpLineZ0Ohm: { type: 'double' },
    note: { type: 'text', nullable: true },
    updatedById: fkColumn(true),
    updatedAt: updatedAtColumn,
  },
  uniques: [{ name: 'UQ_pump_line_device', columns: ['deviceId'] }],
  foreignKeys: [
    { target: LabEntity, columnNames: ['labId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
    { target: DeviceEntity, columnNames: ['deviceId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
    { target: UserEntity, columnNames: ['updatedById'], referencedColumnNames: ['id'], onDelete: 'SET NULL' },
  ],
});
