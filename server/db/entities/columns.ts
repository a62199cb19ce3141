import type { EntitySchemaColumnOptions } from 'typeorm';

// Column helpers with explicit SQL types: the server runs under tsx/esbuild, which emits no
// decorator metadata, so nothing may rely on inferred types.
export const idColumn: EntitySchemaColumnOptions = { type: 'int', primary: true, generated: 'increment' };
export const fkColumn = (nullable = false): EntitySchemaColumnOptions => ({ type: 'int', nullable });
export const varchar = (length: number, nullable = false): EntitySchemaColumnOptions => ({
  type: 'varchar',
  length,
  nullable,
});
/** Millisecond UTC instants; the connection runs with timezone 'Z'. */
export const instant = (nullable = false): EntitySchemaColumnOptions => ({ type: 'datetime', precision: 3, nullable });
// Default spelled out with the column's precision, else TypeORM sees CURRENT_TIMESTAMP(6) vs (3) as a diff.
export const createdAtColumn: EntitySchemaColumnOptions = {
  type: 'datetime',
  precision: 3,
  createDate: true,
  default: () => 'CURRENT_TIMESTAMP(3)',
};
export const updatedAtColumn: EntitySchemaColumnOptions = {
  type: 'datetime',
  precision: 3,
  updateDate: true,
  default: () => 'CURRENT_TIMESTAMP(3)',
  onUpdate: 'CURRENT_TIMESTAMP(3)',
};
export const sha256Column: EntitySchemaColumnOptions = { type: 'char', length: 64 };
