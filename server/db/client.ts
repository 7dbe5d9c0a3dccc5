/**
 * Opens the SQLite database (better-sqlite3, WAL, foreign keys on) and applies the committed
 * migrations from server/db/migrations with drizzle's migrator.
 */
import { fileURLToPath } from 'node:url';
import Database from 'better-sqlite3';
import { drizzle, type BetterSQLite3Database } from 'drizzle-orm/better-sqlite3';
import { migrate } from 'drizzle-orm/better-sqlite3/migrator';
import * as schema from './schema';

export type Orm = BetterSQLite3Database<typeof schema>;

/** The open database: the drizzle ORM, the raw connection, and a synchronous transaction helper. */
export interface Db {
  readonly orm: Orm;
  readonly sqlite: Database.Database;
  /** Runs `fn` in one SQLite transaction (nested calls become savepoints); rolls back if it throws. */
  transaction<T>(fn: () => T): T;
  close(): void;
}

const MIGRATIONS_DIR = fileURLToPath(new URL('./migrations', import.meta.url));

/** Opens `file` (or ':memory:'), sets the pragmas and brings the schema up to date. */
export function openDb(file: string): Db {
  const sqlite = new Database(file);
  if (file !== ':memory:') sqlite.pragma('journal_mode = WAL');
  sqlite.pragma('foreign_keys = ON');
  sqlite.pragma('busy_timeout = 5000');
  const orm = drizzle(sqlite, { schema });
  migrate(orm, { migrationsFolder: MIGRATIONS_DIR });
  return {
    orm,
    sqlite,
    transaction: <T>(fn: () => T): T => sqlite.transaction(fn)(),
    close: () => sqlite.close(),
  };
}
