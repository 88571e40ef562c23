/**
 * Migration 0008 (one vocabulary) on rows stored the old way: the migrations up to 0007 build an
 * in-memory PGlite, rows are inserted with the old JSON keys (tempC, irradiance_Wm2, deviceId,
 * measuredAt, powerClasses, failFlags), then the full migration folder is applied — only 0008
 * is new to the database — and the rows are read back with the new keys and the same values.
 */
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { PGlite } from '@electric-sql/pglite';
import { drizzle } from 'drizzle-orm/pglite';
import { migrate } from 'drizzle-orm/pglite/migrator';
import { MIGRATIONS_DIR } from '@/db/client';

type Journal = { entries: { idx: number; tag: string }[] };

let pg: PGlite;
let before: string;

beforeAll(async () => {
  // The migration folder as it was before 0008: the same files, the journal cut after 0007.
  before = mkdtempSync(path.join(os.tmpdir(), 'ql-migrations-'));
  cpSync(MIGRATIONS_DIR, before, { recursive: true });
  const journalFile = path.join(before, 'meta', '_journal.json');
  const journal = JSON.parse(readFileSync(journalFile, 'utf8')) as Journal;
  const at = journal.entries.findIndex((e) => e.tag === '0008_vocabulary_keys');
  expect(at).toBeGreaterThan(0);
  writeFileSync(journalFile, JSON.stringify({ ...journal, entries: journal.entries.slice(0, at) }));

  pg = new PGlite();
  await pg.waitReady;
  await migrate(drizzle(pg), { migrationsFolder: before });

  await pg.exec(`
    insert into "user" (id, name, email) values ('u1', 'Old User', 'old@example.com');
    insert into organization (id, name, slug, domain) values ('o1', 'Old Org', 'old-org', 'example.com');
    insert into batch (id, organization_id, name) values ('b1', 'o1', 'Old batch');
  `);
  await pg.query(
    `insert into curve (id, organization_id, batch_id, device_id, file_name, meta, voltage_v, current_a, notes, metrics, flags, stc, isc_a, voc_v, pmp_w, ff)
     values ('c1', 'o1', 'b1', 'D-1', 'd-1.csv', $1, '[0, 1]', '[1, 0]', '[]', '{"isc_a": 1}', '[]', $2, 1, 1, 0.25, 0.25)`,
    [
      JSON.stringify({ deviceId: 'D-1', tempC: 33, irradiance_Wm2: 1000, cells: 60, area_cm2: 243, measuredAt: '2025-01-02T03:04:05Z' }),
      JSON.stringify({ method: 'model', from: { irradiance_Wm2: 950, tempC: 33 }, pmp_w: 1, notes: [] }),
    ],
  );
  await pg.query(`insert into fit (id, curve_id, model, result, conditions, reason) values ('f1', 'c1', 'single-diode', '{"model": "single-diode"}', $1, 'upload')`, [
    JSON.stringify({ tempC: 33, cells: 60, irradiance_Wm2: null, idealities: 'fixed' }),
  ]);
  await pg.query(`insert into spec (id, organization_id, family_id, version, name, body, changes) values ('s1', 'o1', 'fam', 1, 'Old spec', $1, '[]')`, [
    JSON.stringify({ name: 'Old spec', limits: { pmp_w: { min: 0 } }, powerClasses: { step_w: 5 }, failFlags: ['low_ff'] }),
  ]);
  // A row already in the new vocabulary must come through unchanged.
  await pg.query(`insert into curve (id, organization_id, batch_id, device_id, file_name, meta, voltage_v, current_a, notes, metrics, flags, isc_a, voc_v, pmp_w, ff)
     values ('c2', 'o1', 'b1', 'D-2', 'd-2.csv', $1, '[0, 1]', '[1, 0]', '[]', '{}', '[]', 1, 1, 0.25, 0.25)`, [JSON.stringify({ device_id: 'D-2', temp_c: 25 })]);

  await migrate(drizzle(pg), { migrationsFolder: MIGRATIONS_DIR });
});

afterAll(async () => {
  await pg.close();
  rmSync(before, { recursive: true, force: true });
});

async function one<T>(sql: string): Promise<T> {
  const r = await pg.query<T>(sql);
  return r.rows[0];
}

describe('migration 0008 renames the keys of stored JSON', () => {
  it('curve.meta and curve.stc.from', async () => {
    const c = await one<{ meta: Record<string, unknown>; stc: { from: Record<string, unknown> } }>(`select meta, stc from curve where id = 'c1'`);
    expect(c.meta).toEqual({ device_id: 'D-1', temp_c: 33, irradiance_w_m2: 1000, cells: 60, area_cm2: 243, measured_at: '2025-01-02T03:04:05Z' });
    expect(c.stc.from).toEqual({ irradiance_w_m2: 950, temp_c: 33 });
  });

  it('fit.conditions, keeping a JSON null as null', async () => {
    const f = await one<{ conditions: Record<string, unknown> }>(`select conditions from fit where id = 'f1'`);
    expect(f.conditions).toEqual({ temp_c: 33, cells: 60, irradiance_w_m2: null, idealities: 'fixed' });
  });

  it('spec.body', async () => {
    const s = await one<{ body: Record<string, unknown> }>(`select body from spec where id = 's1'`);
    expect(s.body).toEqual({ name: 'Old spec', limits: { pmp_w: { min: 0 } }, power_classes: { step_w: 5 }, fail_flags: ['low_ff'] });
  });

  it('a row already in the new vocabulary is unchanged, and no stored key keeps an old name', async () => {
    const c = await one<{ meta: Record<string, unknown> }>(`select meta from curve where id = 'c2'`);
    expect(c.meta).toEqual({ device_id: 'D-2', temp_c: 25 });
    const old = await one<{ n: number }>(
      `select count(*)::int as n from curve where meta ?| array['deviceId', 'tempC', 'irradiance_Wm2', 'measuredAt'] or stc->'from' ?| array['tempC', 'irradiance_Wm2']`,
    );
    expect(old.n).toBe(0);
  });
});
