/**
 * In-memory PGlite for the API tests, started from a migrated template instead of from nothing.
 * A new PGlite runs initdb, which costs several CPU-seconds; loading a tarball of an
 * already-migrated database costs a fraction of that. The template is made once and kept in the
 * system's temporary folder under a name that hashes the PGlite version and every migration file,
 * so a changed migration makes a new one. openDatabase still runs the migrations on the copy
 * (a no-op when the template is current), so a test database is always the committed schema.
 *
 * With QUASILEVEL_TEST_DATABASE_URL (a PostgreSQL server the tests may create databases on, as
 * `.ci/run` sets for its second run of the server project against a throwaway cluster) each test
 * database is a new database there, copied from one migrated template database; it is dropped on close.
 */
import { createHash } from 'node:crypto';
import { existsSync, readdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Client } from 'pg';
import { MIGRATIONS_DIR, openDatabase, openPostgres } from '@/db/client';
import type { Database } from '@/db/client';

function templateFile(): string {
  const hash = createHash('sha256');
  // The package's exports hide its package.json: it sits one folder above the entry (dist/).
  const pgliteManifest = path.join(path.dirname(require.resolve('@electric-sql/pglite')), '..', 'package.json');
  hash.update(JSON.parse(readFileSync(pgliteManifest, 'utf8')).version as string);
  const files = (dir: string): string[] =>
    readdirSync(dir, { withFileTypes: true }).flatMap((e) => (e.isDirectory() ? files(path.join(dir, e.name)) : [path.join(dir, e.name)]));
  for (const f of files(MIGRATIONS_DIR).sort()) hash.update(path.relative(MIGRATIONS_DIR, f)).update(readFileSync(f));
  return path.join(os.tmpdir(), `quasilevel-pglite-template-${hash.digest('hex').slice(0, 16)}.tar`);
}

/** PGlite reads a tarball by its name (.tar, not gzipped). */
const asTarball = (bytes: Uint8Array<ArrayBuffer>) => new File([bytes], 'template.tar', { type: 'application/x-tar' });

let template: Promise<File> | null = null;

async function migratedTemplate(): Promise<File> {
  const file = templateFile();
  if (existsSync(file)) return asTarball(new Uint8Array(readFileSync(file)));
  const fresh = await openDatabase('memory');
  try {
    const bytes = new Uint8Array(await (await fresh.snapshot()).arrayBuffer());
    // Written under a private name and renamed: another test process may be making it too.
    const partial = `${file}.${process.pid}.partial`;
    writeFileSync(partial, bytes);
    renameSync(partial, file);
    return asTarball(bytes);
  } finally {
    await fresh.close();
  }
}

/** A lock number the test processes take while one of them makes the server's template database. */
const TEMPLATE_LOCK = 0x514d;
let serial = 0;

/** A fresh, migrated database of its own on the PostgreSQL server at `server`, dropped on close. */
async function openServerTestDatabase(server: string): Promise<Database> {
  const at = (name: string) => Object.assign(new URL(server), { pathname: `/${name}` });
  const admin = new Client({ connectionString: server });
  await admin.connect();
  const name = `ql_test_${process.pid}_${++serial}`;
  try {
    await admin.query('select pg_advisory_lock($1)', [TEMPLATE_LOCK]);
    try {
      if (!(await admin.query("select 1 from pg_database where datname = 'ql_template'")).rowCount) {
        await admin.query('create database ql_template');
        await (await openPostgres(at('ql_template'), { max: 2 })).close();
      }
    } finally {
      await admin.query('select pg_advisory_unlock($1)', [TEMPLATE_LOCK]);
    }
    await admin.query(`create database ${name} template ql_template`);
  } finally {
    await admin.end();
  }
  const database = await openPostgres(at(name), { max: 5 });
  return {
    ...database,
    close: async () => {
      await database.close();
      const c = new Client({ connectionString: server });
      await c.connect();
      await c.query(`drop database if exists ${name} with (force)`).finally(() => c.end());
    },
  };
}

/** A fresh, migrated database of its own: in memory, or on QUASILEVEL_TEST_DATABASE_URL's server. */
export async function openTestDatabase(): Promise<Database> {
  const server = process.env.QUASILEVEL_TEST_DATABASE_URL;
  if (server) return openServerTestDatabase(server);
  template ??= migratedTemplate();
  return openDatabase('memory', { template: await template });
}
