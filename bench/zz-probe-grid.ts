import { sql, inArray, and, eq } from 'drizzle-orm';
import { openDatabase } from '@/db/client';
import { batch, organization, curve, fit } from '@/db/schema';
import { syntheticFiles } from '@/bench/synthetic-files';
import { analyseFile } from '@/lib/analysis/analyse-file';
import { storeCurve } from '@/server/services/curves';
import { deviceRecords } from '@/server/services/quality';
async function main() {
  const loc = process.argv[2] ?? 'memory';
  const d = await openDatabase(loc);
  const db = d.db, pg = d.pg;
  const have = (await pg.query<{ n: number }>('select count(*)::int as n from curve')).rows[0].n;
  const ids: string[] = Array.from({ length: 10 }, (_, b) => 'b' + b);
  if (!have) {
  await db.insert(organization).values({ id: 'o1', name: 'o', slug: 'o', domain: 'o.example', createdAt: new Date() } as any);
  const enc = new TextEncoder();
  const pool = syntheticFiles(100).map(f => analyseFile(enc.encode(f.text), { fileName: f.name }));
  let t = performance.now();
  for (let b = 0; b < 10; b++) {
    const id = 'b' + b;
    await db.insert(batch).values({ id, organizationId: 'o1', name: id } as any);
    for (let j = 0; j < 1000; j++) {
      const a = pool[(j * 7 + b) % 100];
      await storeCurve(db, { organizationId: 'o1', batchId: id, fileName: 'x', analysis: { ...a, curve: { ...a.curve, meta: { ...a.curve.meta, deviceId: `D${b}-${j}` } } }, userId: null });
    }
  }
  console.log('built', ((performance.now() - t) / 1000).toFixed(1), 's');
  }
  const time = async (label: string, fn: () => Promise<unknown>) => {
    await fn(); const ms: number[] = [];
    for (let k = 0; k < 5; k++) { const t = performance.now(); await fn(); ms.push(performance.now() - t); }
    ms.sort((a, b) => a - b); console.log(label.padEnd(50), ms[2].toFixed(1), 'ms');
  };
  await time('deviceRecords', () => deviceRecords(db, ids));
  await time('curves select (drizzle)', () => db.select({ id: curve.id, batchId: curve.batchId, deviceId: curve.deviceId, metrics: curve.metrics, meta: curve.meta, flags: curve.flagCodes, stc: curve.stc_pmp_w }).from(curve).where(inArray(curve.batchId, ids)).orderBy(curve.deviceId));
  await time('curves select raw', () => pg.query(`select id, batch_id, device_id, metrics, meta, flag_codes, stc_pmp_w from curve where batch_id = any($1) order by device_id`, [ids]));
  await time('curves select raw no json', () => pg.query(`select id, batch_id, device_id, flag_codes, stc_pmp_w from curve where batch_id = any($1) order by device_id`, [ids]));
  const cids = (await pg.query<{ id: string }>(`select id from curve where batch_id = any($1)`, [ids])).rows.map(r => r.id);
  await time('fits inArray 10k ids minus residuals (drizzle)', () => db.select({ curveId: fit.curveId, result: sql`${fit.result} - 'residuals_a'` }).from(fit).where(and(inArray(fit.curveId, cids), eq(fit.current, true), eq(fit.model, 'single-diode'))));
  await time('fits join on batch minus residuals raw', () => pg.query(`select f.curve_id, f.result - 'residuals_a' as result from fit f join curve c on c.id = f.curve_id where c.batch_id = any($1) and f.current and f.model = 'single-diode'`, [ids]));
  await time('fits join, picked keys raw', () => pg.query(`select f.curve_id, jsonb_build_object('converged', f.result->'converged', 'iph_a', f.result->'iph_a', 'i0_a', f.result->'i0_a', 'n', f.result->'n', 'rs_ohm', f.result->'rs_ohm', 'rsh_ohm', f.result->'rsh_ohm', 'rmse_a', f.result->'rmse_a') as result from fit f join curve c on c.id = f.curve_id where c.batch_id = any($1) and f.current and f.model = 'single-diode'`, [ids]));
  await time('fits join, picked keys as columns', () => pg.query(`select f.curve_id, (f.result->>'converged')::boolean as converged, (f.result->>'iph_a')::float8 as iph, (f.result->>'i0_a')::float8 i0, (f.result->>'n')::float8 n, (f.result->>'rs_ohm')::float8 rs, (f.result->>'rsh_ohm')::float8 rsh, (f.result->>'rmse_a')::float8 rmse from fit f join curve c on c.id = f.curve_id where c.batch_id = any($1) and f.current and f.model = 'single-diode'`, [ids]));
  await time('fits join, jsonb_to_record', () => pg.query(`select f.curve_id, x.* from fit f join curve c on c.id = f.curve_id, jsonb_to_record(f.result) as x(converged boolean, iph_a float8, i0_a float8, n float8, rs_ohm float8, rsh_ohm float8, rmse_a float8) where c.batch_id = any($1) and f.current and f.model = 'single-diode'`, [ids]));
  await time('fits, no result at all', () => pg.query(`select f.curve_id from fit f join curve c on c.id = f.curve_id where c.batch_id = any($1) and f.current and f.model = 'single-diode'`, [ids]));
  await time('one query: curve join fit, columns', () => pg.query(`select c.id, c.batch_id, c.device_id, c.metrics, c.meta->'cells' as cells, c.meta->'area_cm2' as area, c.flag_codes, c.stc_pmp_w, (f.result->>'converged')::boolean as converged, (f.result->>'iph_a')::float8 as iph, (f.result->>'i0_a')::float8 i0, (f.result->>'n')::float8 n, (f.result->>'rs_ohm')::float8 rs, (f.result->>'rsh_ohm')::float8 rsh, (f.result->>'rmse_a')::float8 rmse from curve c left join fit f on f.curve_id = c.id and f.current and f.model = 'single-diode' where c.batch_id = any($1) order by c.device_id`, [ids]));
  const ex = await pg.query(`explain analyze select f.curve_id, f.result - 'residuals_a' as result from fit f join curve c on c.id = f.curve_id where c.batch_id = any($1) and f.current and f.model = 'single-diode'`, [ids]);
  console.log(ex.rows.map((r: any) => r['QUERY PLAN']).join('\n'));
  const sz = await pg.query(`select avg(pg_column_size(result))::int as fit_bytes, (select avg(pg_column_size(metrics))::int from curve) as metrics_bytes from fit`);
  console.log(sz.rows);
  await d.close();
}
main();
