/**
 * Acceptance specs, pass/fail, review and release, e-mail and exports through the real app.
 * The pass/fail export is checked row by row against an independent evaluation of the same
 * limits written in this test on the values the API serves.
 */
import { labelOf } from '@/lib/vocabulary';
import { eq } from 'drizzle-orm';
import { batch, curve, fit, member, organization, user } from '@/db/schema';
import { seedDemoBatches } from '@/server/services/seed';
import { rowsOfColumns } from '@/lib/quality';
import { signIn, signUp, startHarness } from '@/tests/server/harness';
import { checkExport } from '@/tests/support/export-checks';
import type { Harness } from '@/tests/server/harness';

let h: Harness;
type Agent = Awaited<ReturnType<typeof signUp>>;
let admin: Agent, tester: Agent, designer: Agent, qa: Agent, outsider: Agent;
let lineTwo: string; // batch with the deliberate defects
let lineThree: string;

const ORG = 'lambda-modules.example';

async function setRole(email: string, role: string) {
  const [u] = await h.database.db.select().from(user).where(eq(user.email, email));
  await h.database.db.update(member).set({ role }).where(eq(member.userId, u.id));
}

beforeAll(async () => {
  h = await startHarness();
  admin = await signUp(h.app, { email: `admin@${ORG}` });
  tester = await signUp(h.app, { email: `tester@${ORG}`, name: 'Tess Tester' });
  await signUp(h.app, { email: `designer@${ORG}` });
  await signUp(h.app, { email: `qa@${ORG}`, name: 'Quentin QA' });
  await setRole(`designer@${ORG}`, 'designer');
  await setRole(`qa@${ORG}`, 'qa_lead');
  designer = await signIn(h.app, `designer@${ORG}`, 'correct-horse-9');
  qa = await signIn(h.app, `qa@${ORG}`, 'correct-horse-9');
  await signUp(h.app, { email: `boss@mu-other.example` });
  outsider = await signUp(h.app, { email: `qa@mu-other.example` });
  await setRole('qa@mu-other.example', 'qa_lead');
  outsider = await signIn(h.app, 'qa@mu-other.example', 'correct-horse-9');

  const [org] = await h.database.db.select().from(organization).where(eq(organization.domain, ORG));
  const [t] = await h.database.db.select().from(user).where(eq(user.email, `tester@${ORG}`));
  await seedDemoBatches(h.database.db, org.id, t.id);
  const batches = await h.database.db.select().from(batch).where(eq(batch.organizationId, org.id));
  lineTwo = batches.find((b) => b.lot === 'M2611')!.id;
  lineThree = batches.find((b) => b.lot === 'M2612')!.id;
});
afterAll(async () => {
  await h.close();
});

const moduleSpec = {
  name: 'KF-M60 release spec',
  limits: { pmp_w: { min: 300 }, ff: { min: 0.7, max: 0.85 }, rs_ohm: { max: 0.6 }, voc_v: { min: 39, max: 43 } },
  power_classes: { step_w: 5 },
  fail_flags: ['step'],
};

describe('specs', () => {
  let specId: string;
  let family_id: string;

  it('a QA lead saves a spec as version 1', async () => {
    const res = await qa.post('/api/specs').send(moduleSpec);
    expect(res.status).toBe(201);
    expect(res.body).toEqual(expect.objectContaining({ id: expect.any(String), version: 1, name: moduleSpec.name }));
    expect(res.body.limits.pmp_w).toEqual({ min: 300 });
    specId = res.body.id;
    family_id = res.body.family_id;
  });

  it.each([
    ['min above max', { name: 'bad', limits: { ff: { min: 0.9, max: 0.8 } } }, /^FF \(%\): the minimum 90\.0 % is above the maximum 80\.0 %$/],
    ['an unknown parameter', { name: 'bad', limits: { wattage: { min: 1 } } }, /unknown parameter "wattage"/],
  ])('refuses %s with 400 and saves nothing', async (_l, body, message) => {
    const before = (await qa.get('/api/specs')).body.specs.length;
    const res = await qa.post('/api/specs').send(body);
    expect(res.status).toBe(400);
    expect(res.body.message).toMatch(message);
    expect((await qa.get('/api/specs')).body.specs.length).toBe(before);
  });

  it.each([['test engineer', () => tester], ['designer', () => designer], ['admin', () => admin]])('a %s may read specs but not write them', async (_l, who) => {
    expect((await who().get('/api/specs')).status).toBe(200);
    expect((await who().post('/api/specs').send(moduleSpec)).status).toBe(403);
  });

  it('a second save makes version 2 with who changed what; version 1 stays as it was', async () => {
    const res = await qa.post('/api/specs').send({ ...moduleSpec, family_id, base_version: 1, limits: { ...moduleSpec.limits, rs_ohm: { max: 0.5 } } });
    expect(res.status).toBe(201);
    expect(res.body.version).toBe(2);
    expect(res.body.changes).toEqual(['Rs: up to 0.6 Ω → up to 0.5 Ω']);
    const v1 = await designer.get(`/api/specs/${specId}`);
    expect(v1.body.limits.rs_ohm).toEqual({ max: 0.6 });
    expect(v1.body.versions.map((v: { version: number; by: string }) => [v.version, v.by])).toEqual([
      [1, 'Quentin QA'],
      [2, 'Quentin QA'],
    ]);
    const list = await designer.get('/api/specs');
    expect(list.body.specs.find((s: { family_id: string }) => s.family_id === family_id).version).toBe(2);
  });

  it('another organisation cannot read the spec', async () => {
    expect((await outsider.get(`/api/specs/${specId}`)).status).toBe(404);
  });
});

/** An independent evaluation of moduleSpec (v1), written here from the spec text, not from lib/quality. */
function judge(c: { metrics: Record<string, number>; fits: { model: string; rs_ohm: number }[]; flags: { code: string }[] }) {
  const rs = c.fits.find((f) => f.model === 'single-diode')!.rs_ohm;
  const reasons: string[] = [];
  if (c.metrics.pmp_w < 300) reasons.push('pmp_w');
  if (c.metrics.ff < 0.7 || c.metrics.ff > 0.85) reasons.push('ff');
  if (rs > 0.6) reasons.push('rs_ohm');
  if (c.metrics.voc_v < 39 || c.metrics.voc_v > 43) reasons.push('voc_v');
  if (c.flags.some((f) => f.code === 'step')) reasons.push('step');
  // Positive-only 5 W classes (common practice): class P when P ≤ Pmax < P + 5.
  const power_class = `P${Math.floor(c.metrics.pmp_w / 5) * 5}`;
  return { result: reasons.length ? 'fail' : 'pass', reasons, power_class };
}

describe('pass/fail export', () => {
  it('matches an independent evaluation row by row, with formula-safe cells', async () => {
    const specs = (await qa.get('/api/specs')).body.specs;
    const v2 = specs.find((s: { name: string }) => s.name === moduleSpec.name);
    const v1id = (await qa.get(`/api/specs/${v2.id}`)).body.versions.find((v: { version: number }) => v.version === 1).id;

    const res = await designer.get(`/api/batches/${lineTwo}/pass-fail.csv?spec=${v1id}`);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/text\/csv/);
    const curves = (await designer.get(`/api/batches/${lineTwo}/curves?page_size=500`)).body.curves;
    // One header row and one row per device, nothing else (papaparse and the strict RFC 4180 reader agree).
    const rows = checkExport(res.text, curves.length).records;
    expect(Object.keys(rows[0])).toEqual(expect.arrayContaining(['device_id', 'batch_name', 'result', 'reasons', 'power_class', 'outlier', 'pmp_w', 'ff_pct', 'eff_pct', 'spec_name', 'spec_version', 'release_state', 'exported_at']));
    const batchName = (await designer.get(`/api/batches/${lineTwo}`)).body.name;

    for (const c of curves) {
      const row = rows.find((r) => r.device_id === c.device_id)!;
      const expected = judge(c);
      expect([c.device_id, row.result]).toEqual([c.device_id, expected.result]);
      // Reasons name the quantity by its label (lib/vocabulary.ts), a flag by its words, and the decision rule.
      const words: Record<string, string> = { pmp_w: 'Pmax ', ff: 'FF ', rs_ohm: 'Rs ', voc_v: 'Voc ', step: 'Flag raised: Step or second knee' };
      for (const key of expected.reasons) expect(row.reasons).toContain(words[key]);
      if (expected.result === 'fail' && expected.reasons.some((k) => k !== 'step')) expect(row.reasons).toContain('(simple rule)');
      if (expected.result === 'pass') expect(row.reasons).toBe('');
      expect(row.power_class).toBe(expected.power_class);
      // Rounded as README states: Pmax to 4 decimals; FF in % (the API's fraction × 100) to 2.
      expect(Number(row.pmp_w)).toBe(Number(c.metrics.pmp_w.toFixed(4)));
      expect(Number(row.ff_pct)).toBe(Number((c.metrics.ff * 100).toFixed(2)));
      expect(row.batch_name).toBe(batchName);
      expect([row.spec_name, row.spec_version]).toEqual([moduleSpec.name, '1']);
      expect(row.release_state).toBe('open');
    }
    // The demo batch's high-Rs module and bypass-step module fail (sample-data scenario).
    expect(rows.find((r) => r.device_id === 'M2611-009')!.result).toBe('fail');
    expect(rows.find((r) => r.device_id === 'M2611-015')!.reasons).toContain('Flag raised: Step or second knee');
  });

  it('escapes a device id that a spreadsheet would run as a formula', async () => {
    const b = (await tester.post('/api/batches').send({ name: 'formula test', cells: 1 })).body;
    const csv = ['# device: =HYPERLINK("http://evil.example","x")', 'V,I', ...Array.from({ length: 20 }, (_, k) => `${(k * 0.03).toFixed(3)},${(0.5 - 0.5 * Math.exp((k * 0.03 - 0.55) / 0.03)).toFixed(5)}`)].join('\n');
    const up = await tester.post(`/api/batches/${b.id}/curves`).attach('files', Buffer.from(csv), 'f.csv');
    expect(up.body.results[0].accepted).toBe(true);
    const spec = (await qa.post('/api/specs').send({ name: 'any', limits: { pmp_w: { min: 0 } } })).body;
    const res = await designer.get(`/api/batches/${b.id}/pass-fail.csv?spec=${spec.id}`);
    const line = res.text.split('\r\n')[1];
    expect(line.startsWith(`"'=HYPERLINK(`)).toBe(true);
  });

  it('needs a spec, and is 404 for another organisation', async () => {
    expect((await designer.get(`/api/batches/${lineThree}/pass-fail.csv`)).status).toBe(400);
    const spec = (await qa.get('/api/specs')).body.specs[0];
    expect((await outsider.get(`/api/batches/${lineTwo}/pass-fail.csv?spec=${spec.id}`)).status).toBe(404);
  });
});

describe('review and release', () => {
  it('a designer cannot submit; a test engineer submits and the QA leads are e-mailed', async () => {
    expect((await designer.post(`/api/batches/${lineThree}/submit`).send({})).status).toBe(403);
    const before = h.mails().length;
    const res = await tester.post(`/api/batches/${lineThree}/submit`).send({ comment: 'Line 3 lot complete.' });
    expect(res.status).toBe(200);
    expect(res.body.batch.state).toBe('in_review');
    expect(res.body.notified).toBe(1);
    const mails = h.mails().slice(before);
    expect(mails).toHaveLength(1);
    expect(mails[0]).toMatch(/To: qa@lambda-modules\.example/);
    expect(mails[0]).toMatch(/for release review/);
    const outbox = await admin.get('/api/outbox');
    expect(outbox.body.messages[0]).toEqual(expect.objectContaining({ kind: 'review-request', to: `qa@${ORG}`, subject: expect.stringContaining('is ready for review') }));
    expect((await tester.post(`/api/batches/${lineThree}/submit`).send({})).status).toBe(409);
  });

  it('holding needs a reason; only a QA lead decides', async () => {
    const spec = (await qa.get('/api/specs')).body.specs.find((s: { name: string }) => s.name === moduleSpec.name);
    expect((await tester.post(`/api/batches/${lineThree}/decision`).send({ decision: 'release', spec_id: spec.id })).status).toBe(403);
    const hold = await qa.post(`/api/batches/${lineThree}/decision`).send({ decision: 'hold', spec_id: spec.id });
    expect(hold.status).toBe(400);
    expect(hold.body.message).toMatch(/why/);
    expect((await qa.get(`/api/batches/${lineThree}`)).body.state).toBe('in_review');
  });

  it('a release records who, when, which spec version and the counts, e-mails the submitter and freezes the batch', async () => {
    const spec = (await qa.get('/api/specs')).body.specs.find((s: { name: string }) => s.name === moduleSpec.name);
    const evaluation = (await qa.get(`/api/batches/${lineThree}/evaluation?spec=${spec.id}`)).body;
    const before = h.mails().length;
    const res = await qa.post(`/api/batches/${lineThree}/decision`).send({ decision: 'release', spec_id: spec.id, comment: 'All within limits.' });
    expect(res.status).toBe(200);
    expect(res.body.batch.state).toBe('released');
    expect(res.body.counts).toEqual(evaluation.counts);
    const mail = h.mails().slice(before);
    expect(mail).toHaveLength(1);
    expect(mail[0]).toMatch(/To: tester@lambda-modules\.example/);
    expect(mail[0]).toMatch(/released/);
    // The mail speaks the screens' words: statistics of each limited parameter with label and
    // unit, an ISO 8601 moment, never a key.
    expect(mail[0]).toMatch(/^Pmax over \d+ devices?: mean [\d.]+ W/m);
    expect(mail[0]).toMatch(/Decided \d{4}-\d{2}-\d{2} \d{2}:\d{2} UTC\./);
    if (evaluation.counts.fail > 0) expect(mail[0]).toMatch(/Why devices fail:/);
    // The words are the text part's; the attached PDF's base64 may hold "+ff/" by chance.
    const words = mail[0].split(/Content-Type: application\/pdf/)[0];
    expect(words).toMatch(/Cpk/);
    expect(words).not.toMatch(/\b(pmp_w|ff|rs_ohm|voc_v)\b/);
    const reviews = (await designer.get(`/api/batches/${lineThree}/reviews`)).body.reviews;
    expect(reviews.map((r: { action: string }) => r.action)).toEqual(['released', 'submitted']);
    expect(reviews[0]).toEqual(expect.objectContaining({ spec_id: spec.id, actor: 'Quentin QA', counts: evaluation.counts, comment: 'All within limits.' }));

    const up = await tester.post(`/api/batches/${lineThree}/curves`).attach('files', Buffer.from('V,I\n0,1\n'), 'late.csv');
    expect(up.status).toBe(409);
    expect((await tester.patch(`/api/batches/${lineThree}`).send({ name: 'renamed' })).status).toBe(409);
    expect((await qa.post(`/api/batches/${lineThree}/decision`).send({ decision: 'hold', spec_id: spec.id, comment: 'x' })).status).toBe(409);
    // The export now carries the release state and, without ?spec, the spec of the decision.
    const csv = await designer.get(`/api/batches/${lineThree}/pass-fail.csv`);
    expect(csv.status).toBe(200);
    const rows = checkExport(csv.text, (await designer.get(`/api/batches/${lineThree}`)).body.curve_count).records;
    expect(rows.every((r) => r.release_state === 'released' && r.spec_name === moduleSpec.name)).toBe(true);
  });

  it('a batch with an unfitted curve cannot be submitted', async () => {
    const b = (await tester.post('/api/batches').send({ name: 'unfitted', cells: 36 })).body;
    const [org] = await h.database.db.select().from(organization).where(eq(organization.domain, ORG));
    const [t] = await h.database.db.select().from(user).where(eq(user.email, `tester@${ORG}`));
    await seedDemoBatches(h.database.db, org.id, t.id).catch(() => 0);
    const donor = (await h.database.db.select().from(curve).where(eq(curve.batchId, lineTwo)))[0];
    await h.database.db.update(curve).set({ batchId: b.id }).where(eq(curve.id, donor.id));
    const [f] = await h.database.db.select().from(fit).where(eq(fit.curveId, donor.id));
    await h.database.db.update(fit).set({ result: { ...f.result, converged: false } }).where(eq(fit.curveId, donor.id));
    // record null: the comparison record is then built from the columns (as for curves stored before migration 0004).
    await h.database.db.update(curve).set({ fitted: false, record: null }).where(eq(curve.id, donor.id));
    const res = await tester.post(`/api/batches/${b.id}/submit`).send({});
    expect(res.status).toBe(409);
    expect(res.body.code).toBe('unfitted_curves');
    expect((await tester.get(`/api/batches/${b.id}`)).body.state).toBe('open');
  });
});

describe('comparison', () => {
  it('puts two batches side by side with statistics and a Welch difference of means', async () => {
    const spec = (await qa.get('/api/specs')).body.specs.find((s: { name: string }) => s.name === moduleSpec.name);
    const res = await designer.get(`/api/compare?batches=${lineTwo},${lineThree}&spec=${spec.id}&param=rs_ohm`);
    expect(res.status).toBe(200);
    const n2 = res.body.batches[0].count;
    const n3 = res.body.batches[1].count;
    // The rows travel as columns per batch; rowsOfColumns gives the objects the grid uses back.
    expect(res.body.rows).toBeUndefined();
    const rows = rowsOfColumns(res.body.tables, res.body.outliers, res.body.batches);
    expect(rows).toHaveLength(n2 + n3);
    expect(rows.filter((r) => r.batch_id === lineTwo)).toHaveLength(n2);
    expect(rows[0]).toEqual(expect.objectContaining({ device_id: expect.any(String), pmp_w: expect.any(Number), rs_ohm: expect.any(Number), result: expect.stringMatching(/pass|fail/) }));
    const s2 = res.body.stats[lineTwo].rs_ohm;
    expect(s2.n).toBe(n2);
    expect(s2.cpk).toEqual(expect.any(Number)); // against the spec's rs_ohm max
    const d = res.body.differences[0];
    // Independent check of the difference and the Welch–Satterthwaite degrees of freedom
    // (Welch 1947) from the rows themselves.
    const pick = (id: string) => rows.filter((r) => r.batch_id === id).map((r) => r.rs_ohm as number);
    const a = pick(lineTwo);
    const b = pick(lineThree);
    const mean = (x: number[]) => x.reduce((s, v) => s + v, 0) / x.length;
    const variance = (x: number[]) => x.reduce((s, v) => s + (v - mean(x)) ** 2, 0) / (x.length - 1);
    const va = variance(a) / a.length;
    const vb = variance(b) / b.length;
    expect(d.difference).toBeCloseTo(mean(b) - mean(a), 10);
    expect(d.dof).toBeCloseTo((va + vb) ** 2 / (va ** 2 / (a.length - 1) + vb ** 2 / (b.length - 1)), 6);
    expect(typeof d.sentence).toBe('string');
  });

  it('marks outliers on the chosen parameter exactly as the batch evaluation does, and counts them', async () => {
    const spec = (await qa.get('/api/specs')).body.specs.find((s: { name: string }) => s.name === moduleSpec.name);
    // The evaluation endpoint marks robust outliers on pmp_w, voc_v, isc_a, ff and rs_ohm at once
    // (server/services/reviews.ts); per parameter the marks must agree with the comparison's.
    const evaluation = (await designer.get(`/api/batches/${lineTwo}/evaluation?spec=${spec.id}`)).body;
    for (const param of ['pmp_w', 'rs_ohm', 'ff']) {
      const res = await designer.get(`/api/compare?batches=${lineTwo},${lineThree}&spec=${spec.id}&param=${param}`);
      expect(res.status).toBe(200);
      const rows = rowsOfColumns(res.body.tables, res.body.outliers, res.body.batches).filter((r) => r.batch_id === lineTwo);
      const expected = new Map(evaluation.devices.map((d: { device_id: string; outlier_params: string[] }) => [d.device_id, d.outlier_params.includes(param)]));
      expect(rows).toHaveLength(expected.size);
      for (const r of rows) expect(r.outlier).toBe(expected.get(r.device_id));
      expect(res.body.counts[lineTwo].outliers).toBe([...expected.values()].filter(Boolean).length);
      expect(res.body.counts[lineTwo].pass).toBe(evaluation.counts.pass);
    }
  });

  it('answers again after a refit changed a batch (no stale comparison)', async () => {
    const first = await designer.get(`/api/compare?batches=${lineTwo}&param=n`);
    const row = rowsOfColumns(first.body.tables, first.body.outliers, first.body.batches).find((r) => r.device_id === 'M2611-005')!;
    const temp_c = (await tester.get(`/api/curves/${row.curve_id}`)).body.meta.temp_c;
    const refit = await tester.post(`/api/curves/${row.curve_id}/refit`).send({ temp_c: temp_c + 20, model: 'single' });
    expect(refit.status).toBe(200);
    const again = await designer.get(`/api/compare?batches=${lineTwo}&param=n`);
    const after = rowsOfColumns(again.body.tables, again.body.outliers, again.body.batches).find((r) => r.device_id === 'M2611-005')!;
    // n·T is what the fit determines, so n falls by the ratio of absolute temperatures.
    expect((after.n as number) / (row.n as number)).toBeCloseTo((temp_c + 273.15) / (temp_c + 20 + 273.15), 2);
  });

  it('404 when a batch belongs to another organisation; 400 for an unknown parameter', async () => {
    expect((await outsider.get(`/api/compare?batches=${lineTwo}`)).status).toBe(404);
    expect((await designer.get(`/api/compare?batches=${lineTwo}&param=wattage`)).status).toBe(400);
  });
});
