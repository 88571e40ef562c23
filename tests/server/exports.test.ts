/**
 * The two CSV exports through the real app (issue 14, item 5): the pass/fail list and the
 * comparison are one header row and one row per device, nothing else — read back with papaparse
 * and with the strict RFC 4180 reader (tests/support/strict-csv.ts); quantities named with their
 * units, FF and efficiency in % (the API's fraction × 100, rounded as the README states); batch,
 * spec, release state and export time on every row; device names with a comma, a quote or a
 * formula come back whole. The high-voltage caution is in the mails and the release record, not
 * in the file; a release shipped in the earlier format is still served as it shipped.
 */
import { createHash } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { batchRelease, member, user } from '@/db/schema';
import { simulateCurve } from '@/lib/iv';
import { HV_CAUTION } from '@/lib/strings/cautions';
import { signIn, signUp, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';
import { checkExport } from '@/tests/support/export-checks';

type Agent = Awaited<ReturnType<typeof signUp>>;
const ORG = 'exports-pv.example';
const sha256 = (x: string) => createHash('sha256').update(x).digest('hex');

/** A cell curve simulated from the benchmark cell's published optimum (tests/fixtures/reference-data/README.md), scaled; invented devices. */
function cellFile(device: string, scale: number, rs_ohm = 0.036547, irradiance = false): Buffer {
  const c = simulateCurve({ iph_a: 0.760788 * scale, i0_a: 3.1068e-7, n: 1.47727, rs_ohm, rsh_ohm: 52.89 }, { cells: 1, temp_c: 33, points: 30 });
  const meta = [`# device: ${device}`, '# cell temperature: 33', ...(irradiance ? ['# irradiance: 1000'] : [])];
  return Buffer.from([...meta, 'V,I', ...c.voltage_v.map((v, k) => `${v},${c.current_a[k]}`)].join('\n'));
}

/** Device names a CSV writer gets wrong: a comma, quotes, a formula, a leading minus. */
const NAMES_A = ['C-1, left', 'C "2"', '=HYPERLINK("http://evil.example","x")', '-3+1'];
const NAMES_B = ['B 1', 'B;2', '@B3'];
/** How the file writes a name: formula-like text behind one leading quote (lib/quality/csv.ts). */
const written = (id: string) => (/^[=+\-@]/.test(id) ? `'${id}` : id);

let h: Harness;
let tester: Agent, qa: Agent, designer: Agent, admin: Agent;
let batchA: string, batchB: string, spec: string;

async function upload(batchId: string, names: string[], irradiance: boolean) {
  let req = tester.post(`/api/batches/${batchId}/curves`);
  names.forEach((name, k) => (req = req.attach('files', cellFile(name, 1 + k * 0.01, k === 1 ? 0.3 : 0.036547, irradiance), `f${k}.csv`)));
  const res = await req;
  expect(res.body.accepted).toBe(names.length);
}

/** The API's figures of a batch's curves, by device id. */
async function curvesOf(batchId: string): Promise<Map<string, { ff: number; efficiency: number | null; pmp_w: number }>> {
  const list = (await designer.get(`/api/batches/${batchId}/curves?page_size=500`)).body.curves as { device_id: string; metrics: { ff: number; efficiency: number | null; pmp_w: number } }[];
  return new Map(list.map((c) => [c.device_id, c.metrics]));
}

/** An ISO 8601 UTC time to the second lies between two instants (the second of `from` counts). */
function within(iso: string, from: number, to: number) {
  const t = Date.parse(iso);
  expect(t).toBeGreaterThanOrEqual(Math.floor(from / 1000) * 1000);
  expect(t).toBeLessThanOrEqual(to);
}

beforeAll(async () => {
  h = await startHarness();
  admin = await signUp(h.app, { email: `admin@${ORG}` });
  tester = await signUp(h.app, { email: `tester@${ORG}` });
  await signUp(h.app, { email: `qa@${ORG}` });
  await signUp(h.app, { email: `designer@${ORG}` });
  for (const [email, role] of [[`qa@${ORG}`, 'qa_lead'], [`designer@${ORG}`, 'designer']]) {
    const [u] = await h.database.db.select().from(user).where(eq(user.email, email));
    await h.database.db.update(member).set({ role }).where(eq(member.userId, u.id));
  }
  qa = await signIn(h.app, `qa@${ORG}`, 'correct-horse-9');
  designer = await signIn(h.app, `designer@${ORG}`, 'correct-horse-9');
  // Batch A's area and its files' irradiance give an efficiency too (invented: a 243 cm² cell at 1000 W/m²).
  batchA = (await tester.post('/api/batches').send({ name: 'Cells, lot "A"', cells: 1, area_cm2: 243 })).body.id;
  batchB = (await tester.post('/api/batches').send({ name: '=Lot B', cells: 1 })).body.id;
  await upload(batchA, NAMES_A, true);
  await upload(batchB, NAMES_B, false);
  // The high-Rs cell (index 1) fails Rs ≤ 0.1 Ω.
  spec = (await qa.post('/api/specs').send({ name: 'Cell spec, line 1', limits: { rs_ohm: { max: 0.1 } } })).body.id;
});
afterAll(async () => {
  await h.close();
});

describe('the pass/fail list', () => {
  it('one header row and one row per device; FF and efficiency in % as the API gives them × 100; names whole; provenance on every row', async () => {
    const before = Date.now();
    const res = await designer.get(`/api/batches/${batchA}/pass-fail.csv?spec=${spec}`);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv; charset=utf-8/);
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="[A-Za-z0-9._-]+\.csv"$/);
    const read = checkExport(res.text, NAMES_A.length);
    expect(res.text).not.toMatch(/high voltage|caution/i);

    const api = await curvesOf(batchA);
    expect(read.records.map((r) => r.device_id).sort()).toEqual(NAMES_A.map(written).sort());
    for (const r of read.records) {
      const id = NAMES_A.find((n) => written(n) === r.device_id)!;
      const m = api.get(id)!;
      expect(Number(r.ff_pct)).toBe(Number((m.ff * 100).toFixed(2)));
      expect(m.efficiency).not.toBeNull();
      expect(Number(r.eff_pct)).toBe(Number((m.efficiency! * 100).toFixed(2)));
      expect(Number(r.pmp_w)).toBe(Number(m.pmp_w.toFixed(4)));
      expect(Number(r.ff_pct)).toBeGreaterThan(1); // a percentage, not a fraction
      expect(r.batch_name).toBe('Cells, lot "A"');
      expect([r.spec_name, r.spec_version, r.release_state]).toEqual(['Cell spec, line 1', '1', 'open']);
      within(r.exported_at, before, Date.now());
      expect(r.result).toBe(id === NAMES_A[1] ? 'fail' : 'pass');
    }
  });
});

describe('the comparison', () => {
  it('every curve of every batch, one row each, with each batch’s name and state and the spec', async () => {
    const before = Date.now();
    const res = await designer.get(`/api/compare/comparison.csv?batches=${batchA},${batchB}&spec=${spec}&param=ff`);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    expect(res.headers['content-disposition']).toMatch(/quasilevel-comparison-\d{4}-\d{2}-\d{2}\.csv/);
    const read = checkExport(res.text, NAMES_A.length + NAMES_B.length);
    expect(read.header).toEqual(expect.arrayContaining(['device_id', 'batch_name', 'result', 'isc_a', 'voc_v', 'pmp_w', 'ff_pct', 'eff_pct', 'i0_a', 'n', 'rs_ohm', 'rsh_ohm', 'j0_a_cm2', 'stc_pmp_w', 'flags', 'reasons']));
    const apiA = await curvesOf(batchA);
    const apiB = await curvesOf(batchB);
    for (const r of read.records) {
      const inA = NAMES_A.some((n) => written(n) === r.device_id);
      const id = [...NAMES_A, ...NAMES_B].find((n) => written(n) === r.device_id)!;
      const m = (inA ? apiA : apiB).get(id)!;
      expect(r.batch_name).toBe(inA ? 'Cells, lot "A"' : "'=Lot B");
      expect(Number(r.ff_pct)).toBe(Number((m.ff * 100).toFixed(2)));
      // Batch B has no area: its efficiency is empty, not 0.
      if (!inA) expect(r.eff_pct).toBe('');
      expect([r.spec_name, r.spec_version, r.release_state]).toEqual(['Cell spec, line 1', '1', 'open']);
      within(r.exported_at, before, Date.now());
    }
  });

  it('without a spec: the spec cells are empty and no result is given', async () => {
    const res = await designer.get(`/api/compare/comparison.csv?batches=${batchB}`);
    const read = checkExport(res.text, NAMES_B.length);
    expect(read.records.every((r) => r.spec_name === '' && r.spec_version === '' && r.result === '')).toBe(true);
  });
});

describe('release: the file, the mails and the record', () => {
  it('the released list says released with the release’s moment; the caution is in both mails and in the record, not in the file', async () => {
    expect((await tester.post(`/api/batches/${batchB}/submit`).send({})).status).toBe(200);
    const out = (await admin.get('/api/outbox')).body.messages as { kind: string; body: string }[];
    expect(out.find((m) => m.kind === 'review-request')!.body).toContain(HV_CAUTION.title);

    const decided = await qa.post(`/api/batches/${batchB}/decision`).send({ decision: 'release', spec_id: spec, comment: 'B;2 goes to rework.' });
    expect(decided.status).toBe(200);
    const mail = ((await admin.get('/api/outbox')).body.messages as { kind: string; body: string }[]).find((m) => m.kind === 'release-decision')!;
    expect(mail.body).toContain(HV_CAUTION.title);
    expect(mail.body).toMatch(/pass\/fail list \(CSV\)/);

    const release = (await designer.get(`/api/batches/${batchB}/reviews`)).body.releases[0];
    const csv = (await designer.get(`/api/batches/${batchB}/pass-fail.csv`)).text;
    expect(sha256(csv)).toBe(release.csv_sha256);
    expect(csv).not.toMatch(/high voltage|caution/i);
    const rows = checkExport(csv, NAMES_B.length).records;
    const at = new Date(release.created_at).toISOString().replace(/\.\d{3}Z$/, 'Z');
    expect(rows.every((r) => r.release_state === 'released' && r.exported_at === at && r.batch_name === "'=Lot B")).toBe(true);

    const detail = (await designer.get(`/api/batches/${batchB}/releases/${release.id}`)).body;
    expect(detail.caution).toBe(HV_CAUTION.short);
    // The comparison now says released for batch B.
    const cmp = checkExport((await designer.get(`/api/compare/comparison.csv?batches=${batchB}&spec=${spec}`)).text, NAMES_B.length).records;
    expect(cmp.every((r) => r.release_state === 'released')).toBe(true);
  });

  it('a list shipped in the earlier format (fractions, a caution row) is still served as it shipped, byte for byte', async () => {
    const [first] = await h.database.db.select().from(batchRelease).where(eq(batchRelease.batchId, batchB));
    // An earlier release's text, as the release of that time wrote it (invented values).
    const old = 'device_id,result,reasons,power_class,outlier,outlier_params,ff,spec_version,release_state\r\nB 1,pass,,,no,,0.7146940202452983,Cell spec v1,released\r\n"# High voltage DC: modules are live in light and cannot be switched off."\r\n';
    await h.database.db.insert(batchRelease).values({ ...first, id: crypto.randomUUID(), revision: first.revision + 1, reviewId: crypto.randomUUID(), csv: old, csvSha256: sha256(old), createdAt: new Date() });
    const latest = (await designer.get(`/api/batches/${batchB}/reviews`)).body.releases[0];
    expect((await designer.get(latest.csv_url)).text).toBe(old);
    expect((await designer.get(`/api/batches/${batchB}/pass-fail.csv`)).text).toBe(old);
    // The new release's file is untouched beside it.
    expect(sha256((await designer.get(`/api/batches/${batchB}/releases/${first.id}/pass-fail.csv`)).text)).toBe(first.csvSha256);
  });
});
