/**
 * Through the real app: comparing batches of different kinds (the demo's single cells against
 * its 60-cell modules, and a lot whose files do not say how many cells they have), and the
 * worst severity of each curve that the overlay chart and the batch table colour and count.
 * The per-cell difference and the pass/fail of each device are recomputed here from the figures
 * the API serves (means by hand, limits compared by hand), not by the product's functions.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import { batch, member, organization, user } from '@/db/schema';
import { SAMPLE_DIR, seedDemoBatches } from '@/server/services/seed';
import { signIn, signUp, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';

let h: Harness;
type Agent = Awaited<ReturnType<typeof signUp>>;
let tester: Agent, qa: Agent;
let cells: string, lineTwo: string, lineThree: string;

const ORG = 'kinds-and-severity.example';

async function setRole(email: string, role: string) {
  const [u] = await h.database.db.select().from(user).where(eq(user.email, email));
  await h.database.db.update(member).set({ role }).where(eq(member.userId, u.id));
}

type Row = { id: string; device_id: string; meta: { cells?: number }; metrics: Record<string, number>; flags: { severity: string }[]; severity: string; reasons: string[] };
async function allRows(batchId: string): Promise<{ curves: Row[]; spec: { id: string; name: string; version: number } | null }> {
  const res = await tester.get(`/api/batches/${batchId}/curves?page_size=500`);
  expect(res.status).toBe(200);
  return res.body;
}
const mean = (xs: number[]) => xs.reduce((s, x) => s + x, 0) / xs.length;
/** Worst flag severity, written out here: info counts as nothing. */
const worstFlag = (flags: { severity: string }[]) => (flags.some((f) => f.severity === 'fail') ? 'fail' : flags.some((f) => f.severity === 'warn') ? 'warn' : 'pass');

beforeAll(async () => {
  h = await startHarness();
  await signUp(h.app, { email: `admin@${ORG}` });
  tester = await signUp(h.app, { email: `tester@${ORG}`, name: 'Tess Tester' });
  await signUp(h.app, { email: `qa@${ORG}`, name: 'Quentin QA' });
  await setRole(`qa@${ORG}`, 'qa_lead');
  qa = await signIn(h.app, `qa@${ORG}`, 'correct-horse-9');
  const [org] = await h.database.db.select().from(organization).where(eq(organization.domain, ORG));
  const [t] = await h.database.db.select().from(user).where(eq(user.email, `tester@${ORG}`));
  await seedDemoBatches(h.database.db, org.id, t.id);
  const batches = await h.database.db.select().from(batch).where(eq(batch.organizationId, org.id));
  cells = batches.find((b) => b.cells === 1)!.id;
  lineTwo = batches.find((b) => b.lot === 'M2611')!.id;
  lineThree = batches.find((b) => b.lot === 'M2612')!.id;
});
afterAll(async () => {
  await h.close();
});

describe('comparing batches of different kinds', () => {
  it('cells against 60-cell modules: Voc is compared per cell, said in words, and the difference is of the per-cell means', async () => {
    const res = await tester.get(`/api/compare?batches=${cells},${lineTwo}&param=voc_v`);
    expect(res.status).toBe(200);
    const k = res.body.kinds;
    expect(k.mixed).toBe(true);
    expect(k.basis).toBe('per_cell');
    expect(k.batches.map((b: { label: string }) => b.label)).toEqual(['single cells', '60-cell modules']);
    expect(k.note).toMatch(/different kinds of devices.*single cells.*60-cell modules.*compared per cell: Voc ÷ cells in series/);
    const d = res.body.differences[0];
    expect(d.basis).toBe('per_cell');
    expect(d.sentence).toMatch(/Voc per cell/);
    // By hand from the served curves: each device's Voc over its cells in series.
    const perCell = async (id: string) => (await allRows(id)).curves.map((c) => c.metrics.voc_v / c.meta.cells!);
    const a = await perCell(cells);
    const b = await perCell(lineTwo);
    expect(d.difference).toBeCloseTo(mean(b) - mean(a), 10);
    expect(k.per_cell_stats[lineTwo].mean).toBeCloseTo(mean(b), 10);
    // A 60-cell module's Voc per cell lies near a cell's (0.6–0.75 V for silicon, common practice), not 60 times it.
    expect(mean(b)).toBeGreaterThan(0.6);
    expect(mean(b)).toBeLessThan(0.75);
  });

  it('Isc between cells and modules: compared as measured, saying it depends on cell size and strings in parallel', async () => {
    const res = await tester.get(`/api/compare?batches=${cells},${lineTwo}&param=isc_a`);
    expect(res.body.kinds.basis).toBe('as_measured');
    expect(res.body.kinds.note).toMatch(/Isc does not depend on the cells in series.*cell size and on strings in parallel/);
    expect(res.body.differences[0].basis).toBe('as_measured');
    const a = (await allRows(cells)).curves.map((c) => c.metrics.isc_a);
    const b = (await allRows(lineTwo)).curves.map((c) => c.metrics.isc_a);
    expect(res.body.differences[0].difference).toBeCloseTo(mean(b) - mean(a), 10);
  });

  it('two batches of one kind: no note, as measured', async () => {
    const res = await tester.get(`/api/compare?batches=${lineTwo},${lineThree}&param=pmp_w`);
    expect(res.body.kinds).toMatchObject({ mixed: false, basis: 'as_measured', note: null, per_cell_stats: null });
    expect(res.body.differences[0].sentence).toEqual(expect.any(String));
  });

  it('modules against a lot whose files do not say the cell count: the t-test on Pmax is refused with the reason; FF is compared', async () => {
    // The demo module files without their "cells in series" line, in a batch without a default (invented lot).
    const b = (await tester.post('/api/batches').send({ name: 'Lot without counts' })).body;
    const dir = path.join(SAMPLE_DIR, 'batches', 'kf-m60-2612');
    let up = tester.post(`/api/batches/${b.id}/curves`);
    for (const f of ['M2612-001.csv', 'M2612-002.csv', 'M2612-003.csv']) {
      const text = readFileSync(path.join(dir, f), 'utf8').split('\n').filter((l) => !/cells in series/i.test(l)).join('\n');
      up = up.attach('files', Buffer.from(text), `silent-${f}`);
    }
    const done = await up;
    expect(done.body.accepted).toBe(3);
    // Cells (1 per device) against this lot: whether the kinds differ cannot be told, so Pmax is not tested.
    const res = await tester.get(`/api/compare?batches=${cells},${b.id}&param=pmp_w`);
    expect(res.body.kinds.basis).toBe('refused');
    const d = res.body.differences[0];
    expect(d.basis).toBe('refused');
    expect(d.sentence).toBeUndefined();
    expect(d.error).toMatch(/3 devices of “Lot without counts” do not say how many cells are in series, so it cannot be told whether they are single cells like the rest\. Pmax adds up over the cells in series: Welch’s t-test is not run on it/);
    // With the 60-cell modules as well, the kinds differ: the lot cannot be put per cell either.
    const three = await tester.get(`/api/compare?batches=${lineTwo},${cells},${b.id}&param=voc_v`);
    expect(three.body.kinds).toMatchObject({ mixed: true, basis: 'refused' });
    expect(three.body.differences.map((x: { basis: string }) => x.basis)).toEqual(['per_cell', 'refused']);
    const ff = await tester.get(`/api/compare?batches=${cells},${b.id}&param=ff`);
    expect(ff.body.differences[0].basis).toBe('as_measured');
    expect(ff.body.differences[0].sentence).toEqual(expect.any(String));
  });
});

describe('each curve’s worst severity', () => {
  it('without a spec: the flags’ worst severity, the same in the overlay and the batch table', async () => {
    const overlay = await tester.get(`/api/batches/${lineTwo}/overlay?max=60`);
    expect(overlay.status).toBe(200);
    expect(overlay.body.spec).toBeNull();
    const { curves, spec } = await allRows(lineTwo);
    expect(spec).toBeNull();
    expect(overlay.body.curves).toHaveLength(curves.length);
    const byId = new Map(curves.map((c) => [c.id, c]));
    for (const o of overlay.body.curves) {
      const c = byId.get(o.id)!;
      expect([c.device_id, o.severity]).toEqual([c.device_id, worstFlag(c.flags)]);
      expect(c.severity).toBe(o.severity);
      expect(c.reasons).toEqual([]);
    }
    // The demo batch has a bypass-step module (sample-data scenario): at least one failing curve.
    expect(overlay.body.curves.some((o: { severity: string }) => o.severity === 'fail')).toBe(true);
  });

  it('after a decision with a spec: fail exactly where the spec’s limits fail (compared by hand), warnings from the flags', async () => {
    const spec = (await qa.post('/api/specs').send({ name: 'Overlay check', limits: { pmp_w: { min: 300 }, ff: { min: 0.7 } } })).body;
    expect((await tester.post(`/api/batches/${lineTwo}/submit`).send({})).status).toBe(200);
    expect((await qa.post(`/api/batches/${lineTwo}/decision`).send({ decision: 'hold', spec_id: spec.id, comment: 'Check the failing modules.' })).status).toBe(200);

    const overlay = await tester.get(`/api/batches/${lineTwo}/overlay?max=60`);
    expect(overlay.body.spec).toEqual({ id: spec.id, name: 'Overlay check', version: 1 });
    const page = await allRows(lineTwo);
    expect(page.spec).toEqual(overlay.body.spec);
    const byId = new Map(page.curves.map((c) => [c.id, c]));
    const counts = { pass: 0, warn: 0, fail: 0 } as Record<string, number>;
    for (const o of overlay.body.curves) {
      const c = byId.get(o.id)!;
      const fails = c.metrics.pmp_w < 300 || c.metrics.ff < 0.7;
      const expected = fails ? 'fail' : worstFlag(c.flags) === 'pass' ? 'pass' : 'warn';
      expect([c.device_id, o.severity]).toEqual([c.device_id, expected]);
      expect(c.severity).toBe(expected);
      expect(c.reasons.length > 0).toBe(fails);
      counts[o.severity] += 1;
    }
    // The defective demo modules fail 300 W / 70 % (sample-data scenario); a passing one with a flag only warns.
    expect(counts.fail).toBeGreaterThan(0);
    expect(counts.pass).toBeGreaterThan(0);
    const evaluation = (await tester.get(`/api/batches/${lineTwo}/evaluation?spec=${spec.id}`)).body;
    expect(counts.fail).toBe(evaluation.counts.fail);
  });
});
