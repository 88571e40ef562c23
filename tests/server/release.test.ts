/**
 * A released batch is final, release is deliberate, spec edits do not overwrite each other —
 * through the real app on an in-memory PGlite. The races are played out for real: an upload
 * whose multipart body arrives slowly while the batch is released, and an upload whose files
 * are still being fitted when it is released.
 */
import { createHash } from 'node:crypto';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { eq, inArray } from 'drizzle-orm';
import request from 'supertest';
import { curve, fit, member, user } from '@/db/schema';
import { simulateCurve } from '@/lib/iv';
import { errorHandler } from '@/server/errors';
import { inlineAnalyser } from '@/server/services/analysis-pool';
import type { Analyser } from '@/server/services/analysis-pool';
import { describeAudit } from '@/lib/auth/audit';
import { BASE_URL, signIn, signUp, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';
import { checkExport } from '@/tests/support/export-checks';

type Agent = Awaited<ReturnType<typeof signUp>>;
const ORG = 'release-race.example';
const sha256 = (x: string | Buffer) => createHash('sha256').update(x).digest('hex');

/**
 * The analyser of this app: the server's own inline one, except that while `hold` is set every
 * file waits for it (and `reached` says a file is waiting), so a release can happen mid-upload.
 */
const inline = inlineAnalyser();
let hold: { open: () => void; gate: Promise<void>; reached: Promise<void>; arrive: () => void } | null = null;
function closeGate() {
  let open = () => {};
  let arrive = () => {};
  const gate = new Promise<void>((r) => (open = r));
  const reached = new Promise<void>((r) => (arrive = r));
  hold = { open, gate, reached, arrive };
  return hold;
}
const gatedAnalyser: Analyser = {
  threads: 0,
  analyse: async (req) => {
    const g = hold;
    if (g) {
      g.arrive();
      await g.gate;
    }
    return inline.analyse(req);
  },
  close: async () => undefined,
};

/** A cell curve simulated from the benchmark cell's published optimum (tests/fixtures/reference-data/README.md), `rs_ohm` changed for a failing device. */
function cellFile(device: string, scale: number, rs_ohm = 0.036547): Buffer {
  const c = simulateCurve({ iph_a: 0.760788 * scale, i0_a: 3.1068e-7, n: 1.47727, rs_ohm, rsh_ohm: 52.89 }, { cells: 1, temp_c: 33, points: 30 });
  return Buffer.from([`# device: ${device}`, '# cell temperature: 33', 'V,I', ...c.voltage_v.map((v, k) => `${v},${c.current_a[k]}`)].join('\n'));
}

let h: Harness;
let admin: Agent, tester: Agent, qa: Agent, qa2: Agent, designer: Agent;
let server: http.Server;
let cookieHeader = '';
let slowRequest: http.ClientRequest | null = null;
let loose: string; // every device passes
let strict: string; // the high-Rs device fails

async function setRole(email: string, role: string) {
  const [u] = await h.database.db.select().from(user).where(eq(user.email, email));
  await h.database.db.update(member).set({ role }).where(eq(member.userId, u.id));
}

/** A batch made and filled by `who` (the test engineer unless said), with three cells, one of them high-Rs. */
async function makeBatch(name: string, who: Agent = tester) {
  const b = (await who.post('/api/batches').send({ name, cells: 1 })).body;
  const up = await who
    .post(`/api/batches/${b.id}/curves`)
    .attach('files', cellFile(`${name}-1`, 1), 'c1.csv')
    .attach('files', cellFile(`${name}-2`, 1.01), 'c2.csv')
    .attach('files', cellFile(`${name}-3`, 0.99, 0.3), 'c3.csv');
  expect(up.status).toBe(201);
  return { id: b.id as string, curveIds: up.body.results.map((r: { curve_id: string }) => r.curve_id) as string[] };
}

async function submit(batchId: string) {
  expect((await tester.post(`/api/batches/${batchId}/submit`).send({})).status).toBe(200);
}

const curve_count = async (batchId: string) => (await h.database.db.select({ id: curve.id }).from(curve).where(eq(curve.batchId, batchId))).length;

/** The session cookie of a member, for requests written by hand. */
async function cookieOf(email: string): Promise<string> {
  const res = await request(h.app).post('/api/auth/sign-in/email').set('Origin', BASE_URL).send({ email, password: 'correct-horse-9' });
  return ([] as string[]).concat(res.headers['set-cookie'] ?? []).map((c) => c.split(';')[0]).join('; ');
}

beforeAll(async () => {
  h = await startHarness({ analyser: gatedAnalyser });
  admin = await signUp(h.app, { email: `admin@${ORG}` });
  tester = await signUp(h.app, { email: `tester@${ORG}`, name: 'Tess Tester' });
  await signUp(h.app, { email: `qa@${ORG}`, name: 'Quentin QA' });
  await signUp(h.app, { email: `qa2@${ORG}`, name: 'Quinta QA' });
  await signUp(h.app, { email: `designer@${ORG}` });
  await setRole(`qa@${ORG}`, 'qa_lead');
  await setRole(`qa2@${ORG}`, 'qa_lead');
  await setRole(`designer@${ORG}`, 'designer');
  qa = await signIn(h.app, `qa@${ORG}`, 'correct-horse-9');
  qa2 = await signIn(h.app, `qa2@${ORG}`, 'correct-horse-9');
  designer = await signIn(h.app, `designer@${ORG}`, 'correct-horse-9');
  loose = (await qa.post('/api/specs').send({ name: 'Loose', limits: { pmp_w: { min: 0 } } })).body.id;
  strict = (await qa.post('/api/specs').send({ name: 'Strict', limits: { rs_ohm: { max: 0.1 } } })).body.id;
  cookieHeader = await cookieOf(`tester@${ORG}`);
  server = h.app.listen(0);
});
afterAll(async () => {
  await new Promise((r) => server.close(r));
  await h.close();
});

describe('a released batch is final', () => {
  it('an upload whose body was still arriving when the batch was released is refused (409) and stores nothing; the CSV stays byte-identical', async () => {
    const b = await makeBatch('race');
    await submit(b.id);
    const before = await curve_count(b.id);

    // A multipart body written by hand, the file's second half held back.
    const boundary = 'ql-slow-boundary';
    const file = cellFile('race-late', 1.02).toString();
    const head = `--${boundary}\r\nContent-Disposition: form-data; name="files"; filename="late.csv"\r\nContent-Type: text/csv\r\n\r\n`;
    const tail = `\r\n--${boundary}--\r\n`;
    let answered = false;
    const response = new Promise<{ status: number; body: { code: string; message: string } }>((resolve, reject) => {
      const req = http.request(
        {
          port: (server.address() as AddressInfo).port,
          method: 'POST',
          path: `/api/batches/${b.id}/curves`,
          headers: { cookie: cookieHeader, origin: BASE_URL, 'content-type': `multipart/form-data; boundary=${boundary}`, 'content-length': Buffer.byteLength(head + file + tail) },
        },
        (res) => {
          answered = true;
          let text = '';
          res.on('data', (c) => (text += c));
          res.on('end', () => resolve({ status: res.statusCode ?? 0, body: JSON.parse(text) }));
        },
      );
      req.on('error', reject);
      req.write(head + file.slice(0, file.length / 2));
      slowRequest = req;
    });
    // The state check before the body (server/routes/batches.ts) has passed: no answer yet while the body is incomplete.
    await new Promise((r) => setTimeout(r, 300));
    expect(answered).toBe(false);

    const release = await qa.post(`/api/batches/${b.id}/decision`).send({ decision: 'release', spec_id: loose });
    expect(release.status).toBe(200);
    const csvBefore = await designer.get(`/api/batches/${b.id}/pass-fail.csv`);
    expect(csvBefore.status).toBe(200);

    slowRequest!.end(file.slice(file.length / 2) + tail);
    const res = await response;
    expect(res.status).toBe(409);
    expect(res.body.code).toBe('batch_released');
    expect(await curve_count(b.id)).toBe(before);

    // Replace a reviewed passing device, refit it, upload another: all refused, nothing changes.
    const replace = await tester.post(`/api/batches/${b.id}/curves`).field('on_duplicate', 'replace').attach('files', cellFile('race-1', 0.5), 'c1.csv');
    expect([replace.status, replace.body.code]).toEqual([409, 'batch_released']);
    const refit = await tester.post(`/api/curves/${b.curveIds[0]}/refit`).send({ model: 'single', temp_c: 60 });
    expect([refit.status, refit.body.code]).toEqual([409, 'batch_released']);
    const another = await tester.post(`/api/batches/${b.id}/curves`).attach('files', cellFile('race-9', 1), 'c9.csv');
    expect([another.status, another.body.code]).toEqual([409, 'batch_released']);
    expect(await curve_count(b.id)).toBe(before);
    const csvAfter = await designer.get(`/api/batches/${b.id}/pass-fail.csv`);
    expect(Buffer.from(csvAfter.text).equals(Buffer.from(csvBefore.text))).toBe(true);
  });

  it('an upload still being fitted when the batch is released stores nothing (the check sits in the writing transaction)', async () => {
    const b = await makeBatch('fitting');
    await submit(b.id);
    const before = await curve_count(b.id);
    const g = closeGate();
    const upload = tester.post(`/api/batches/${b.id}/curves`).attach('files', cellFile('fitting-late', 1.02), 'late.csv').then((r) => r);
    await g.reached; // received, checked writable, now waiting in the analyser
    hold = null;
    const release = await qa.post(`/api/batches/${b.id}/decision`).send({ decision: 'release', spec_id: loose });
    expect(release.status).toBe(200);
    g.open();
    const res = await upload;
    expect([res.status, res.body.code]).toEqual([409, 'batch_released']);
    // Said by the upload's own locked check, not only by the database's guard behind it.
    expect(res.body.message).toMatch(/released.*Nothing was stored/);
    expect(await curve_count(b.id)).toBe(before);
  });

  it('the database refuses a direct insert, change or delete of a curve or fit of a released batch, and that refusal answers 409 batch_released', async () => {
    const b = await makeBatch('trigger');
    await submit(b.id);
    expect((await qa.post(`/api/batches/${b.id}/decision`).send({ decision: 'release', spec_id: loose })).status).toBe(200);
    const db = h.database.db;
    const [row] = await db.select().from(curve).where(eq(curve.id, b.curveIds[0]));
    const copy = { ...row, id: crypto.randomUUID(), deviceId: 'smuggled' };
    const insert = await db.insert(curve).values(copy).then(() => null, (e: unknown) => e);
    expect(insert).not.toBeNull();
    await expect(db.update(curve).set({ pmp_w: 1 }).where(eq(curve.id, row.id))).rejects.toBeTruthy();
    await expect(db.delete(curve).where(eq(curve.id, row.id))).rejects.toBeTruthy();
    await expect(db.update(fit).set({ current: false }).where(eq(fit.curveId, row.id))).rejects.toBeTruthy();
    const [oneFit] = await db.select().from(fit).where(eq(fit.curveId, row.id));
    await expect(db.insert(fit).values({ ...oneFit, id: crypto.randomUUID() })).rejects.toBeTruthy();
    await expect(db.delete(fit).where(eq(fit.id, oneFit.id))).rejects.toBeTruthy();
    // Moved in from an open batch, or out to one: refused as well (the old and the new batch are both checked).
    const open = await makeBatch('trigger-open');
    await expect(db.update(curve).set({ batchId: b.id }).where(eq(curve.id, open.curveIds[0]))).rejects.toBeTruthy();
    await expect(db.update(curve).set({ batchId: open.id }).where(eq(curve.id, row.id))).rejects.toBeTruthy();
    // One statement over curves of both batches is refused whole: the open batch's curve is unchanged too.
    await expect(db.update(curve).set({ pmp_w: 2 }).where(inArray(curve.id, [open.curveIds[1], row.id]))).rejects.toBeTruthy();
    expect((await db.select().from(curve).where(eq(curve.id, open.curveIds[1])))[0].pmp_w).not.toBe(2);
    // The open batch's own curves and fits still change.
    await db.update(curve).set({ pmp_w: 2 }).where(eq(curve.id, open.curveIds[1]));
    await db.update(fit).set({ current: false }).where(eq(fit.curveId, open.curveIds[1]));
    expect(await curve_count(b.id)).toBe(3);
    expect((await db.select({ n: fit.id }).from(fit).where(eq(fit.curveId, row.id))).length).toBeGreaterThan(0);
    expect((await db.select().from(curve).where(eq(curve.id, row.id)))[0].pmp_w).toBe(row.pmp_w);

    // The database's own error, as any route would meet it, goes out as 409 batch_released.
    let sent: { status?: number; body?: unknown } = {};
    const res = { headersSent: false, status: (s: number) => ((sent.status = s), res), json: (body: unknown) => ((sent.body = body), res) };
    errorHandler(insert, {} as never, res as never, () => undefined);
    expect(sent).toEqual({ status: 409, body: { code: 'batch_released', message: expect.any(String) } });
  });

  it('the release record keeps each device with its figures, result and data hashes; the CSV is served from it', async () => {
    const b = await makeBatch('record', qa2);
    await submit(b.id);
    const res = await qa.post(`/api/batches/${b.id}/decision`).send({ decision: 'release', spec_id: strict, comment: 'High-Rs cell goes to rework.' });
    expect(res.status).toBe(200);
    const list = (await designer.get(`/api/batches/${b.id}/reviews`)).body;
    expect(list.releases).toHaveLength(1);
    const summary = list.releases[0];
    expect(list.reviews[0]).toEqual(expect.objectContaining({ action: 'released', release_id: summary.id }));
    expect(summary).toEqual(expect.objectContaining({ revision: 1, spec_id: strict, spec_name: 'Strict', spec_version: 1, counts: expect.objectContaining({ total: 3, fail: 1 }) }));
    const detail = (await designer.get(`/api/batches/${b.id}/releases/${summary.id}`)).body;
    expect(detail.devices).toHaveLength(3);
    for (const d of detail.devices) {
      const c = (await designer.get(`/api/curves/${d.curve_id}`)).body;
      // Hashes recomputed here from what the API serves: the points as JSON [V, I], and the uploaded file's bytes.
      expect(d.points_sha256).toBe(sha256(JSON.stringify([c.points.voltage_v, c.points.current_a])));
      const k = Number(d.device_id.split('-').pop());
      expect(d.file_sha256).toBe(sha256(cellFile(`record-${k}`, k === 1 ? 1 : k === 2 ? 1.01 : 0.99, k === 3 ? 0.3 : undefined)));
      expect(d.figures.pmp_w).toBeCloseTo(c.metrics.pmp_w, 12);
      expect(d.result).toBe(k === 3 ? 'fail' : 'pass');
    }
    const csv = await designer.get(`/api/batches/${b.id}/pass-fail.csv`);
    expect(sha256(csv.text)).toBe(summary.csv_sha256);
    // The CSV of a release: one row per device, released, its export time the release's moment.
    const rows = checkExport(csv.text, 3).records;
    expect(rows.every((r) => r.release_state === 'released' && r.spec_name === 'Strict' && r.spec_version === '1')).toBe(true);
    expect(rows.every((r) => r.exported_at === new Date(summary.created_at).toISOString().replace(/\.\d{3}Z$/, 'Z'))).toBe(true);
  });
});

describe('release is deliberate', () => {
  it('a release with failing devices and no comment is refused with 400 naming the comment', async () => {
    const b = await makeBatch('failing');
    await submit(b.id);
    const res = await qa.post(`/api/batches/${b.id}/decision`).send({ decision: 'release', spec_id: strict });
    expect(res.status).toBe(400);
    expect(res.body.code).toBe('comment_required');
    expect(res.body.message).toMatch(/^comment: 1 of 3 devices fail/);
    expect((await designer.get(`/api/batches/${b.id}`)).body.state).toBe('in_review');
    // Without failures no comment is needed.
    expect((await qa.post(`/api/batches/${b.id}/decision`).send({ decision: 'release', spec_id: loose })).status).toBe(200);
  });

  it('whoever uploaded a curve or submitted the batch cannot release it (403 same_person); another QA lead can', async () => {
    const b = await makeBatch('duties');
    // qa2 adds a curve to the test engineer's batch.
    expect((await qa2.post(`/api/batches/${b.id}/curves`).attach('files', cellFile('duties-4', 1), 'c4.csv')).status).toBe(201);
    await submit(b.id);
    const refused = await qa2.post(`/api/batches/${b.id}/decision`).send({ decision: 'release', spec_id: loose });
    expect([refused.status, refused.body.code]).toEqual([403, 'same_person']);
    expect(refused.body.message).toMatch(/uploaded some of its curves/);
    expect((await qa2.get(`/api/batches/${b.id}/reviews`)).body.release_check).toEqual({ allowed: false, code: 'same_person', message: refused.body.message });
    expect((await qa.get(`/api/batches/${b.id}/reviews`)).body.release_check).toEqual({ allowed: true });
    // Another QA lead, who neither uploaded nor submitted, releases it.
    expect((await qa.post(`/api/batches/${b.id}/decision`).send({ decision: 'release', spec_id: loose })).status).toBe(200);

    // A QA lead who submitted a batch does not release it either.
    const own = await makeBatch('own', qa);
    expect((await qa.post(`/api/batches/${own.id}/submit`).send({})).status).toBe(200);
    const self = await qa.post(`/api/batches/${own.id}/decision`).send({ decision: 'release', spec_id: loose });
    expect([self.status, self.body.code]).toEqual([403, 'same_person']);
  });

  it('an administrator may turn separation of duties off (recorded); then the submitter releases; only an admin may change it', async () => {
    expect((await admin.get('/api/organization')).body.separate_release).toBe(true);
    expect((await qa.patch('/api/organization').send({ separate_release: false })).status).toBe(403);
    const empty = await admin.patch('/api/organization').send({});
    expect([empty.status, empty.body.code]).toEqual([400, 'invalid_input']);
    expect(empty.body.message).toMatch(/Name a setting to change/);
    expect((await admin.patch('/api/organization').send({ separate_release: 'no' })).status).toBe(400);

    const own = await makeBatch('own-off', qa);
    expect((await qa.post(`/api/batches/${own.id}/submit`).send({})).status).toBe(200);
    expect((await qa.get(`/api/batches/${own.id}/reviews`)).body.release_check.allowed).toBe(false);

    const off = await admin.patch('/api/organization').send({ separate_release: false });
    expect([off.status, off.body.separate_release, off.body.join_by_domain]).toEqual([200, false, false]);
    expect((await qa.get(`/api/batches/${own.id}/reviews`)).body.release_check).toEqual({ allowed: true });
    expect((await qa.post(`/api/batches/${own.id}/decision`).send({ decision: 'release', spec_id: loose })).status).toBe(200);
    const audit = (await admin.get('/api/organization/audit')).body.entries;
    expect(audit[0]).toMatchObject({ action: 'setting_changed' });
    expect(describeAudit(audit[0])).toMatch(/turned separation of duties at release off/);

    expect((await admin.patch('/api/organization').send({ separate_release: true })).body.separate_release).toBe(true);
    const again = await makeBatch('own-on', qa);
    expect((await qa.post(`/api/batches/${again.id}/submit`).send({})).status).toBe(200);
    const refused = await qa.post(`/api/batches/${again.id}/decision`).send({ decision: 'release', spec_id: loose });
    expect([refused.status, refused.body.code]).toEqual([403, 'same_person']);
  });
});

describe('reopening a released batch', () => {
  it('needs a written reason; the batch goes on hold as a new revision and its release stays readable', async () => {
    const b = await makeBatch('reopen');
    await submit(b.id);
    expect((await qa.post(`/api/batches/${b.id}/decision`).send({ decision: 'release', spec_id: loose })).status).toBe(200);
    const first = (await designer.get(`/api/batches/${b.id}/reviews`)).body.releases[0];
    const csvReleased = (await designer.get(first.csv_url)).text;

    for (const body of [{}, { reason: '   ' }]) {
      const res = await qa.post(`/api/batches/${b.id}/reopen`).send(body);
      expect(res.status).toBe(400);
      expect(res.body.message).toBe('Write why the released batch is reopened.');
      expect(res.body.details[0].path).toEqual(['reason']);
    }
    expect((await tester.post(`/api/batches/${b.id}/reopen`).send({ reason: 'x' })).status).toBe(403);
    expect((await designer.get(`/api/batches/${b.id}`)).body.state).toBe('released');

    const reopened = await qa.post(`/api/batches/${b.id}/reopen`).send({ reason: 'Customer found a mislabelled cell.' });
    expect(reopened.status).toBe(200);
    expect(reopened.body).toEqual(expect.objectContaining({ revision: 2, batch: expect.objectContaining({ state: 'on_hold' }) }));
    expect((await qa.post(`/api/batches/${b.id}/reopen`).send({ reason: 'again' })).status).toBe(409);
    const reviews = (await designer.get(`/api/batches/${b.id}/reviews`)).body;
    expect(reviews.reviews.map((r: { action: string }) => r.action)).toEqual(['reopened', 'released', 'submitted']);
    expect(reviews.reviews[0].comment).toBe('Customer found a mislabelled cell.');
    expect(reviews.releases.map((r: { id: string }) => r.id)).toEqual([first.id]);
    const old = await designer.get(first.csv_url);
    expect(old.status).toBe(200);
    expect(old.text).toBe(csvReleased);

    // Changed, submitted and released again: revision 2, the first release unchanged beside it.
    expect((await tester.post(`/api/curves/${b.curveIds[1]}/refit`).send({ model: 'single', temp_c: 30 })).status).toBe(200);
    await submit(b.id);
    expect((await qa.post(`/api/batches/${b.id}/decision`).send({ decision: 'release', spec_id: loose })).status).toBe(200);
    const releases = (await designer.get(`/api/batches/${b.id}/reviews`)).body.releases;
    expect(releases.map((r: { revision: number }) => r.revision)).toEqual([2, 1]);
    expect((await designer.get(first.csv_url)).text).toBe(csvReleased);
  });
});

describe('concurrent spec edits', () => {
  it('two saves on one base version: one makes the next version, the other gets 409 spec_conflict with the newer changes', async () => {
    const v1 = (await qa.post('/api/specs').send({ name: 'Shared', limits: { pmp_w: { min: 0.2 } } })).body;
    const edit = (limits: Record<string, { min?: number; max?: number }>) => ({ name: 'Shared', limits, family_id: v1.family_id, base_version: 1 });
    const answers = await Promise.all([qa.post('/api/specs').send(edit({ pmp_w: { min: 0.25 } })), qa2.post('/api/specs').send(edit({ pmp_w: { min: 0.2 }, ff: { min: 0.7 } }))]);
    expect(answers.map((a) => a.status).sort()).toEqual([201, 409]);
    const saved = answers.find((a) => a.status === 201)!.body;
    const conflict = answers.find((a) => a.status === 409)!.body;
    expect(saved.version).toBe(2);
    expect(conflict).toEqual(expect.objectContaining({ code: 'spec_conflict', message: expect.stringContaining('Version 2'), newer: expect.objectContaining({ id: saved.id, version: 2, changes: saved.changes }) }));
    // Re-applied on the newer version, the save goes through.
    const again = await qa2.post('/api/specs').send({ ...edit({ pmp_w: { min: 0.25 }, ff: { min: 0.7 } }), base_version: 2 });
    expect([again.status, again.body.version]).toEqual([201, 3]);
    const missing = await qa.post('/api/specs').send({ name: 'Shared', limits: {}, family_id: v1.family_id });
    expect(missing.status).toBe(400);
    expect(missing.body.message).toBe('Say which version this edit started from.');
    expect(missing.body.details[0].path).toEqual(['base_version']);
  });
});
