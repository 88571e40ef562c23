/**
 * Opens Quasilevel's embedded PostgreSQL (PGlite) and wraps it in Drizzle.
 * On disk by default (./data/db, QUASILEVEL_DATA_DIR overrides the data folder); in memory for tests.
 * Committed SQL migrations in db/migrations are applied on every open (idempotent).
 */
import { mkdirSync } from 'node:fs';
import path from 'node:path';
import { PGlite } from '@electric-sql/pglite';
import { drizzle } from 'drizzle-orm/pglite';
import type { PgliteDatabase } from 'drizzle-orm/pglite';
import { migrate } from 'drizzle-orm/pglite/migrator';
import * as schema from '@/db/schema';

export type Db = PgliteDatabase<typeof schema>;
export type Database = { db: Db; pg: PGlite; close: () => Promise<void> };

export const MIGRATIONS_DIR = path.resolve(__dirname, 'migrations');

/** The data folder: QUASILEVEL_DATA_DIR or ./data under the working directory. */
export function dataDir(): string {
  return path.resolve(process.env.QUASILEVEL_DATA_DIR || 'data');
}

/**
 * Opens the database. `location` is a folder on disk, or 'memory' for a throw-away instance.
 * `template` (memory only) is a `dumpDataDir()` tarball of a migrated database to start from:
 * it skips initdb, the slow part of a new PGlite (the tests open one per file).
 */
export async function openDatabase(location: string | 'memory', opts: { template?: Blob } = {}): Promise<Database> {
  let pg: PGlite;
  if (location === 'memory') {
    pg = opts.template ? new PGlite({ loadDataDir: opts.template }) : new PGlite();
  } else {
    // PGlite does not create parent folders itself.
    mkdirSync(location, { recursive: true });
    pg = new PGlite(location);
  }
  await pg.waitReady;
  const db = drizzle(pg, { schema });
  await migrate(db, { migrationsFolder: MIGRATIONS_DIR });
  let closed = false;
  return {
    db,
    pg,
    close: async () => {
      if (closed) return;
      closed = true;
      await pg.close();
    },
  };
}
