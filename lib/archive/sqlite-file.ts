import { createRequire } from "node:module";

/**
 * Direct access to the SQLite file, for the backup and restore scripts (SQLite's online backup
 * API, which copies a consistent snapshot while the server keeps writing) and for tests that look
 * at a running server's database from outside. better-sqlite3 is the driver the app's adapter
 * uses; it ships no types, so the few calls used here are typed by hand.
 */
export interface SqliteStatement {
  all(...params: unknown[]): Record<string, unknown>[];
  get(...params: unknown[]): Record<string, unknown> | undefined;
  run(...params: unknown[]): { changes: number };
}
export interface SqliteDatabase {
  prepare(sql: string): SqliteStatement;
  pragma(sql: string, options?: { simple?: boolean }): unknown;
  backup(destination: string): Promise<unknown>;
  close(): void;
}
type Open = new (
  file: string,
  options?: { readonly?: boolean; fileMustExist?: boolean },
) => SqliteDatabase;

const require = createRequire(import.meta.url);
const Database = require("better-sqlite3") as Open;

export function openSqlite(file: string, readonly = false): SqliteDatabase {
  return new Database(file, { readonly, fileMustExist: true });
}
