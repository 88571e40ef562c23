/**
 * Hostile inputs through the real upload route: every file of the corpus (tests/robustness/
 * corpus.ts) is uploaded alone in its own request. A readable file is stored (201) with its
 * device id as text; anything else gets a 4xx whose message names the problem, and leaves no
 * row behind. Afterwards the database holds exactly the accepted files and the server still answers.
 */
import { eq } from 'drizzle-orm';
import { curve, fit } from '@/db/schema';
import { buildCorpus } from '@/tests/robustness/corpus';
import type { CorpusEntry } from '@/tests/robustness/corpus';
import { agentFor, signUp, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';

/** A message longer than this is not a sentence someone reads (the parser quotes at most 60 characters of a cell). */
const MAX_MESSAGE_CHARS = 400;

type UploadResult = { file: string; accepted: boolean; curve_id?: string; device_id?: string; code?: string; error?: string };

const corpus = buildCorpus();
let h: Harness;
let tester: Awaited<ReturnType<typeof signUp>>;
let batchId: string;
/** What the API said per corpus entry, filled by the per-file tests. */
const outcome = new Map<string, { status: number; curveId?: string }>();

beforeAll(async () => {
  h = await startHarness();
  await signUp(h.app, { email: 'admin@hostile-pv.example' });
  tester = await signUp(h.app, { email: 'tester@hostile-pv.example' }); // second in the domain: a test engineer
  const res = await tester.post('/api/batches').send({ name: 'Hostile inputs', cells: 1 });
  expect(res.status).toBe(201);
  batchId = res.body.id;
});
afterAll(async () => {
  await h.close();
});

it(`the corpus has at least 60 files, accepted and rejected ones, with unique names (${corpus.length} built)`, () => {
  expect(corpus.length).toBeGreaterThanOrEqual(60);
  expect(new Set(corpus.map((e) => e.fileName)).size).toBe(corpus.length);
  expect(corpus.filter((e) => e.expect.accept).length).toBeGreaterThanOrEqual(20);
  expect(corpus.filter((e) => !e.expect.accept).length).toBeGreaterThanOrEqual(40);
  const sizes = corpus.map((e) => e.bytes.length);
  expect(Math.max(...sizes)).toBeGreaterThan(12 * 1024 * 1024 - 1);
});

describe('each file alone in its own request', () => {
  it.each(corpus.map((e) => [e.name, e] as [string, CorpusEntry]))('%s', async (_name, e) => {
    const res = await tester.post(`/api/batches/${batchId}/curves`).attach('files', e.bytes, e.fileName);
    outcome.set(e.fileName, { status: res.status, curveId: res.body?.results?.[0]?.curve_id });
    if (e.expect.accept) {
      expect(res.status).toBe(201);
      const [r] = res.body.results as UploadResult[];
      expect(r).toEqual(expect.objectContaining({ file: e.fileName, accepted: true, curve_id: expect.any(String) }));
      const [row] = await h.database.db.select({ deviceId: curve.deviceId, fileName: curve.fileName, n: curve.voltage_v }).from(curve).where(eq(curve.id, r.curve_id!));
      expect(row.fileName).toBe(e.fileName);
      // The id is stored and served exactly as written: text, never evaluated or rewritten.
      if (e.expect.deviceId !== undefined) {
        expect(row.deviceId).toBe(e.expect.deviceId);
        const served = await tester.get(`/api/curves/${r.curve_id}`);
        expect(served.status).toBe(200);
        expect(served.body.device_id).toBe(e.expect.deviceId);
      }
      // The corpus curve has 40 points (corpus.ts); the forward-and-back sweep averages to the same 40 voltages.
      expect(row.n).toHaveLength(40);
      return;
    }
    const status = e.expect.status ?? 422;
    expect(res.status).toBe(status);
    let message: string;
    if (status === 422) {
      expect(res.body).toEqual(expect.objectContaining({ accepted: 0, rejected: 1 }));
      const [r] = res.body.results as UploadResult[];
      expect(r).toEqual(expect.objectContaining({ file: e.fileName, accepted: false, code: expect.any(String), error: expect.any(String) }));
      expect(r.curve_id).toBeUndefined();
      message = r.error!;
    } else {
      expect(res.body).toEqual({ code: expect.any(String), message: expect.any(String) });
      message = res.body.message;
    }
    expect(message).toMatch(e.expect.message);
    expect(message.length).toBeLessThanOrEqual(MAX_MESSAGE_CHARS);
  });
});

describe('after the whole corpus', () => {
  it('the database holds exactly the accepted files, each with its fits, and nothing of a rejected one', async () => {
    expect(outcome.size).toBe(corpus.length);
    const accepted = corpus.filter((e) => e.expect.accept);
    const rows = await h.database.db.select({ id: curve.id, fileName: curve.fileName }).from(curve);
    expect(rows.map((r) => r.fileName).sort()).toEqual(accepted.map((e) => e.fileName).sort());
    const ids = new Set(rows.map((r) => r.id));
    expect([...ids].sort()).toEqual(accepted.map((e) => outcome.get(e.fileName)!.curveId!).sort());
    const fits = await h.database.db.select({ curveId: fit.curveId, model: fit.model }).from(fit);
    // Every accepted upload is fitted with both models (single and double diode), nothing else has fits.
    expect(fits.every((f) => ids.has(f.curveId))).toBe(true);
    expect(fits.length).toBe(2 * accepted.length);
    for (const e of corpus.filter((x) => !x.expect.accept)) expect(outcome.get(e.fileName)!.status).toBeGreaterThanOrEqual(400);
  });

  it('the batch table lists the accepted curves, and the server still answers health and uploads', async () => {
    const accepted = corpus.filter((e) => e.expect.accept).length;
    const list = await tester.get(`/api/batches/${batchId}`);
    expect(list.status).toBe(200);
    expect(list.body.curve_count).toBe(accepted);
    const health = await agentFor(h.app).get('/api/health');
    expect(health.status).toBe(200);
    expect(health.body.ok).toBe(true);
    const again = await tester.post(`/api/batches/${batchId}/curves`).attach('files', corpus.find((e) => e.fileName === 'plain.csv')!.bytes, 'plain-again.csv');
    expect(again.status).toBe(201);
  });
});

describe('odd requests rather than odd files', () => {
  const plain = () => corpus.find((e) => e.fileName === 'plain.csv')!.bytes;
  const huge = () => corpus.find((e) => e.fileName === 'huge.csv')!.bytes;
  let before: number;
  beforeEach(async () => {
    before = (await h.database.db.select({ id: curve.id }).from(curve)).length;
  });
  afterEach(async () => {
    expect((await h.database.db.select({ id: curve.id }).from(curve)).length).toBe(before);
  });

  it('a good file beside a 12 MB one: 413 for the request and the good file is not stored either', async () => {
    const res = await tester.post(`/api/batches/${batchId}/curves`).attach('files', plain(), 'beside-huge.csv').attach('files', huge(), 'huge-2.csv');
    expect(res.status).toBe(413);
    expect(res.body).toEqual({ code: 'file_too_large', message: expect.stringMatching(/10 MB limit; nothing was stored/) });
  });

  type Send = (a: typeof tester) => ReturnType<typeof tester.post>;
  it.each<[string, number, string, RegExp, Send]>([
    ['no file at all', 400, 'no_files', /No files were sent/, (a) => a.post(`/api/batches/${batchId}/curves`).field('temp_c', '25')],
    ['the file in another form field', 400, 'wrong_field', /form field "files" \(got "file"\)/, (a) => a.post(`/api/batches/${batchId}/curves`).attach('file', Buffer.from('V,I\n'), 'x.csv')],
    ['a JSON body instead of a form', 400, 'no_files', /No files were sent/, (a) => a.post(`/api/batches/${batchId}/curves`).send({ files: ['V,I'] })],
    [
      'a multipart body that is cut off',
      400,
      'bad_upload',
      /could not be read as a multipart form/,
      (a) => a.post(`/api/batches/${batchId}/curves`).set('Content-Type', 'multipart/form-data; boundary=XYZ').send('--XYZ\r\nContent-Disposition: form-data; name="files"; filename="cut.csv"\r\n\r\nV,I\n0,1\n'),
    ],
    ['a temperature override that is not a number', 400, 'invalid_input', /Cell temperature \(°C\) must be a number/, (a) => a.post(`/api/batches/${batchId}/curves`).field('temp_c', 'warm').attach('files', plain(), 'override.csv')],
  ])('%s → %i %s', async (_name, status, code, message, send) => {
    const res = await send(tester);
    expect(res.status).toBe(status);
    expect(res.body.code).toBe(code);
    expect(res.body.message).toMatch(message);
  });
});
