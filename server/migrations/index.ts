/** Every migration, in order. New migrations are appended here as classes (no glob loading). */
import { Foundation1764650000000 } from './1764650000000-foundation';

export const migrations = [Foundation1764650000000];
