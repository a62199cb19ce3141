import { InitialSchema1796145458454 } from './1796145458454-InitialSchema';
import { CalibrationRecords1796146611820 } from './1796146611820-CalibrationRecords';
import { Planning1796148466104 } from './1796148466104-Planning';

/** Every migration, oldest first. Imported as classes (no glob) so tsx and ts-jest load the same set. */
export const MIGRATIONS: Function[] = [InitialSchema1796145458454, CalibrationRecords1796146611820, Planning1796148466104];
