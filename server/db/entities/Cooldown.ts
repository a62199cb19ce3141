import { EntitySchema } from 'typeorm';
import { createdAtColumn, fkColumn, idColumn, varchar } from './columns';
import { DeviceEntity } from './Device';
import { UserEntity } from './User';

export interface CooldownRow {
  id: number;
  deviceId: number;
  /** YYYY-MM-DD */
  startedOn: string;
  fridge: string;
  notes: string | null;
  createdById: number | null;
  createdAt: Date;
}

export const CooldownEntity = new EntitySchema<CooldownRow>({
  name: 'Cooldown',
  tableName: 'cooldown',
  columns: {
    id: idColumn,
    deviceId: fkColumn(),
    startedOn: { type: 'date' },
    fridge: varchar(64),
    notes: { type: 'text', nullable: true },
    createdById: fkColumn(true),
    createdAt: createdAtColumn,
  },
  foreignKeys: [
    { target: DeviceEntity, columnNames: ['deviceId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
    { target: UserEntity, columnNames: ['createdById'], referencedColumnNames: ['id'], onDelete: 'SET NULL' },
  ],
});
