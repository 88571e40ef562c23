import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { and, asc, count, eq, sql, inArray } from 'drizzle-orm';
import { startRuntime } from '@/server/runtime';
import { freePort } from '@/tests/support/server-process';
import { signIn, createBatch, uploadFiles } from '@/bench/api-client';
import { syntheticFiles } from '@/bench/synthetic-files';
import { curve, fit } from '@/db/schema';
import { fitsFor } from '@/server/services/curves';
async function main() {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'ql-probe-'));
  const port = await freePort();
  const rt = await startRuntime({ dataDir: dir, port, host: '127.0.0.1', seed: true });
  const url = `http://127.0.0.1:${port}`;
  process.env.PUBLIC_URL = url;
  try {
    const s = await signIn(url, 'tomas.reyes@kestrel-pv.example', 'kestrel-test-demo');
    const id = await createBatch(s, { name: 'probe' });
    await uploadFiles(s, id, syntheticFiles(100));
    const db = rt.database.db; const pg = rt.database.pg;
    const time = async (label: string, fn: () => Promise<unknown>) => {
      const ms: number[] = [];
      for (let k = 0; k < 20; k++) { const t = performance.now(); await fn(); ms.push(performance.now() - t); }
      ms.sort((a, b) => a - b); console.log(label.padEnd(40), ms[10].toFixed(2), 'ms');
    };
    await time('select 1', () => pg.query('select 1'));
    await time('count', () => db.select({ total: count() }).from(curve).where(eq(curve.batchId, id)));
    await time('page all cols', () => db.select().from(curve).where(eq(curve.batchId, id)).orderBy(sql`${curve.pmp_w} desc nulls last`, asc(curve.id)).limit(50));
    await time('page raw pg all cols', () => pg.query(`select * from curve where batch_id = $1 order by pmp_w desc nulls last, id limit 50`, [id]));
    await time('page no points', () => pg.query(`select id, batch_id, device_id, file_name, meta, metrics, flags, stc, created_at from curve where batch_id = $1 order by pmp_w desc nulls last, id limit 50`, [id]));
    const rows = await db.select({ id: curve.id }).from(curve).where(eq(curve.batchId, id)).limit(50);
    await time('fitsFor 50', () => fitsFor(db, rows.map(r => r.id), true));
    await time('fits raw no residuals', () => pg.query(`select id, curve_id, model, current, result - 'residuals_a' as result, conditions, reason, created_at from fit where curve_id = any($1) and current`, [rows.map(r => r.id)]));
    const { fromNodeHeaders } = await import('better-auth/node');
    const auth = (rt as any).auth;
    const { member, organization, session, user } = await import('@/db/schema');
    await time('member join', () => db.select({ memberId: member.id }).from(member).innerJoin(organization, eq(member.organizationId, organization.id)).limit(1));
    await time('session by token raw', () => pg.query('select * from session s join "user" u on u.id = s.user_id limit 1'));
    await time('GET /api/me over http', () => fetch(url + '/api/me', { headers: { cookie: s.cookie } }).then(r => r.arrayBuffer()));
    await time('GET /api/health over http', () => fetch(url + '/api/health').then(r => r.arrayBuffer()));
    const orig = pg.query.bind(pg); const log: string[] = [];
    (pg as any).query = async (q: string, p?: unknown[], o?: unknown) => { const t = performance.now(); const r = await orig(q, p as any, o as any); log.push((performance.now() - t).toFixed(2) + ' ' + q.slice(0, 110)); return r; };
    const origEx = (pg as any).execProtocol?.bind(pg);
    const t0 = performance.now();
    await fetch(url + '/api/me', { headers: { cookie: s.cookie } }).then(r => r.arrayBuffer());
    console.log('me total', (performance.now() - t0).toFixed(2)); console.log(log.join('\n')); log.length = 0;
    const t1 = performance.now();
    await fetch(url + `/api/batches/${id}/curves?page=1&pageSize=50&sort=pmp_w&dir=desc`, { headers: { cookie: s.cookie } }).then(r => r.arrayBuffer());
    console.log('page total', (performance.now() - t1).toFixed(2)); console.log(log.join('\n')); log.length = 0;
    await time('pg.query explain', () => pg.query('select 1 from session where token = $1', ['x']));
  } finally {
    await rt.stop(); rmSync(dir, { recursive: true, force: true });
  }
}
main();
