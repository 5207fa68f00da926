import type { ColumnType } from 'kysely';

/** JSON columns: written as a string or value, read as parsed JSON. */
export type Json<T> = ColumnType<T, T | string, T | string>;
