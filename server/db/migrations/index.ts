import { InitialSchema1796145458454 } from './1796145458454-InitialSchema';

/** Every migration, oldest first. Imported as classes (no glob) so tsx and ts-jest load the same set. */
export const MIGRATIONS: Function[] = [InitialSchema1796145458454];
