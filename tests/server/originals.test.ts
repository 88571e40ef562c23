/**
 * The raw-data archive (issue 20) against the local S3 fake (s3rver, one per file through the
 * harness): every uploaded file — accepted or rejected, UTF-8 with BOM and CRLF, UTF-16, binary,
 * odd names — comes back byte for byte one by one and in the zip, with the SHA-256 the upload
 * answered, the curve page and the release record name; the administrator's re-hash finds a
 * changed and a missing object; re-analysis keeps the earlier fits and is refused for a released
 * batch; deletion is refused inside the retention period and recorded; the start-up cleanup
 * removes objects no row points to; and with the fake stopped, uploads and downloads answer 503
 * with nothing stored in the database. All files here are invented for this test.
 */
import { createHash } from 'node:crypto';
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { and, count, eq } from 'drizzle-orm';
import Papa from 'papaparse';
import { curve, originalFile, user } from '@/db/schema';
import { simulateCurve } from '@/lib/iv';
import { originalsCheckSchema, curveDetailSchema } from '@/lib/schemas/responses';
import { cleanOrphans, deleteBatchOriginals } from '@/server/services/originals-admin';
import { openFakeStorage, originalKey } from '@/server/storage';
import { startFakeS3 } from '@/server/storage/fake-s3';
import { signUp, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';
import { crc32, readZip } from '@/tests/support/zip-reader';

type Agent = Awaited<ReturnType<typeof signUp>>;
const ORG = 'archive-pv.example';
const sha256 = (x: Uint8Array) => createHash('sha256').update(x).digest('hex');

/** A cell curve simulated from the benchmark cell's published optimum (tests/fixtures/reference-data/README.md) as I-V text. */
function cellText(device: string, eol = '\n'): string {
  const c = simulateCurve({ iph_a: 0.760788, i0_a: 3.1068e-7, n: 1.47727, rs_ohm: 0.036547, rsh_ohm: 52.89 }, { cells: 1, temp_c: 33, points: 30 });
  return [`# device: ${device}`, '# cell temperature: 33', 'V,I', ...c.voltage_v.map((v, k) => `${v},${c.current_a[k]}`)].join(eol);
}
const utf16le = (text: string) => Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(text, 'utf16le')]);

/** The invented upload: names and bytes of several kinds. */
const FILES: { name: string; bytes: Buffer; accepted: boolean }[] = [
  { name: 'M2611-015.csv', bytes: Buffer.from(cellText('M2611-015')), accepted: true },
  { name: 'Modul ü #2 (copy).csv', bytes: Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(cellText('Modul-ü-2', '\r\n'))]), accepted: true },
  { name: 'utf16 module.txt', bytes: utf16le(cellText('U16-003', '\r\n')), accepted: true },
  { name: 'mödule – 25°C; "odd".dat', bytes: Buffer.from(cellText('odd-004')), accepted: true },
  { name: 'binary.dat', bytes: Buffer.from(Array.from({ length: 1024 }, (_, k) => (k * 37) % 256)), accepted: false },
  { name: 'photo.png', bytes: Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0xff, 0]), accepted: false },
  // The same bytes as the first file under another name: a duplicate device, refused, kept under the same key.
  { name: 'copy of M2611-015.csv', bytes: Buffer.from(cellText('M2611-015')), accepted: false },
];

let h: Harness;
let admin: Agent, tester: Agent, qa: Agent;
let orgId = '';

/** Reads an answer's body as bytes, whatever its type. */
function binary(res: unknown, done: (err: Error | null, body: Buffer) => void) {
  // In node, superagent hands the parser the response stream (already decompressed).
  const stream = res as NodeJS.ReadableStream;
  const chunks: Buffer[] = [];
  stream.on('data', (c: Buffer) => chunks.push(c));
  stream.on('end', () => done(null, Buffer.concat(chunks)));
}
/** The file name of a Content-Disposition header (RFC 6266: filename*=UTF-8''… wins over filename=). */
function dispositionName(header: string): string {
  const ext = /filename\*=UTF-8''([^;]+)/i.exec(header);
  if (ext) return decodeURIComponent(ext[1]);
  const plain = /filename="?([^";]+)"?/i.exec(header);
  return plain ? plain[1] : '';
}
const getBytes = (agent: Agent, url: string) => agent.get(url).buffer(true).parse(binary);

async function newBatch(name: string): Promise<string> {
  const res = await tester.post('/api/batches').send({ name, cells: 1 });
  expect(res.status).toBe(201);
  return res.body.id as string;
}

async function upload(batchId: string, files: { name: string; bytes: Buffer }[]) {
  let req = tester.post(`/api/batches/${batchId}/curves`);
  for (const f of files) req = req.attach('files', f.bytes, f.name);
  return req;
}

const rowsOf = async (batchId: string) => (await h.database.db.select({ n: count() }).from(originalFile).where(eq(originalFile.batchId, batchId)))[0].n;
const curvesOf = async (batchId: string) => (await h.database.db.select({ n: count() }).from(curve).where(eq(curve.batchId, batchId)))[0].n;

beforeAll(async () => {
  h = await startHarness();
  admin = await signUp(h.app, { email: `admin@${ORG}` });
  tester = await signUp(h.app, { email: `tester@${ORG}` });
  qa = await signUp(h.app, { email: `qa@${ORG}` });
  const [q] = await h.database.db.select().from(user).where(eq(user.email, `qa@${ORG}`));
  const { member } = await import('@/db/schema');
  await h.database.db.update(member).set({ role: 'qa_lead' }).where(eq(member.userId, q.id));
  orgId = (await h.database.db.select({ o: member.organizationId }).from(member).where(eq(member.userId, q.id)))[0].o;
}, 120_000);
afterAll(async () => {
  await h.close();
});

describe('originals kept byte for byte', () => {
  let batchId = '';
  let results: { file: string; accepted: boolean; curve_id?: string; code?: string; file_sha256?: string }[] = [];

  beforeAll(async () => {
    batchId = await newBatch('Archive round trip');
    const res = await upload(batchId, FILES);
    expect(res.status).toBe(201);
    results = res.body.results;
  });

  it('answers each file with its SHA-256, accepted or rejected', () => {
    expect(results.map((r) => [r.file, r.accepted])).toEqual(FILES.map((f) => [f.name, f.accepted]));
    expect(results.map((r) => r.file_sha256)).toEqual(FILES.map((f) => sha256(f.bytes)));
    expect(results.filter((r) => !r.accepted).map((r) => r.code)).toEqual(['unreadable', 'wrong_type', 'duplicate'].map((c) => expect.stringMatching(new RegExp(c === 'unreadable' ? '.+' : c))));
  });

  it('GET /api/curves/:id/original returns the name, type and exact bytes; the curve page names hash and size', async () => {
    for (const [k, f] of FILES.entries()) {
      if (!f.accepted) continue;
      const id = results[k].curve_id!;
      const res = await getBytes(tester, `/api/curves/${id}/original`);
      expect(res.status).toBe(200);
      expect(Buffer.compare(res.body as Buffer, f.bytes)).toBe(0);
      expect(sha256(res.body as Buffer)).toBe(sha256(f.bytes));
      expect(res.headers['x-original-sha256']).toBe(sha256(f.bytes));
      expect(dispositionName(res.headers['content-disposition'])).toBe(f.name);
      expect(res.headers['content-type']).toBe(f.name.endsWith('.csv') ? 'text/csv' : 'text/plain');
      const detail = await tester.get(`/api/curves/${id}`);
      expect(curveDetailSchema.safeParse(detail.body).success).toBe(true);
      expect(detail.body.original).toEqual({ file_name: f.name, file_sha256: sha256(f.bytes), file_size_bytes: f.bytes.length, content_type: expect.any(String), kept: true, deleted_at: null, url: `/api/curves/${id}/original` });
    }
  });

  it('stores each object under org/<organisation>/batch/<batch>/<sha256>, identical bytes once', async () => {
    const listed = await h.storage!.store.list(`org/${orgId}/batch/${batchId}/`);
    const expected = [...new Set(FILES.map((f) => originalKey(orgId, batchId, sha256(f.bytes))))].sort();
    expect(listed.map((o) => o.key).sort()).toEqual(expected);
    for (const f of FILES) expect(Buffer.compare(await h.storage!.store.get(originalKey(orgId, batchId, sha256(f.bytes))), f.bytes)).toBe(0);
  });

  it('GET /api/batches/:id/originals.zip holds every original and a manifest (name, SHA-256, device, result)', async () => {
    const res = await getBytes(tester, `/api/batches/${batchId}/originals.zip`);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/zip');
    const entries = readZip(res.body as Buffer);
    // The zip's own CRC-32 of every entry agrees with one computed here.
    for (const e of entries) expect(e.crc32).toBe(crc32(e.bytes));
    const manifest = entries.find((e) => e.name === 'manifest.csv')!;
    const rows = Papa.parse<Record<string, string>>(manifest.bytes.toString('utf8'), { header: true }).data;
    expect(rows.map((r) => r.file_name)).toEqual(FILES.map((f) => f.name));
    for (const [k, f] of FILES.entries()) {
      const row = rows[k];
      expect(row.file_sha256).toBe(sha256(f.bytes));
      expect(Number(row.file_size_bytes)).toBe(f.bytes.length);
      expect(row.result).toBe(f.accepted ? 'accepted' : 'rejected');
      const entry = entries.find((e) => e.name === row.zip_entry)!;
      expect(Buffer.compare(entry.bytes, f.bytes)).toBe(0);
      expect(sha256(entry.bytes)).toBe(row.file_sha256);
    }
    expect(rows[0].device_id).toBe('M2611-015');
    expect(rows[6].device_id).toBe('M2611-015');
    expect(new Set(rows.map((r) => r.zip_entry)).size).toBe(FILES.length);
    expect(entries).toHaveLength(FILES.length + 1);
  });

  it('the administrator re-hash finds nothing wrong, then a changed and a missing object', async () => {
    const ok = await admin.post(`/api/batches/${batchId}/originals/verify`);
    expect(ok.status).toBe(200);
    expect(originalsCheckSchema.safeParse(ok.body).success).toBe(true);
    expect([ok.body.ok, ok.body.checked, ok.body.problems]).toEqual([true, FILES.length, []]);
    // Changed behind the product's back: one object overwritten, one removed.
    const changed = originalKey(orgId, batchId, sha256(FILES[1].bytes));
    await h.storage!.store.put(changed, Buffer.from('not the measurement'), 'text/plain');
    await h.storage!.store.remove([originalKey(orgId, batchId, sha256(FILES[3].bytes))]);
    const bad = await admin.post(`/api/batches/${batchId}/originals/verify`);
    expect(bad.body.ok).toBe(false);
    expect(bad.body.problems.map((p: { file_name: string; problem: string }) => [p.file_name, p.problem])).toEqual([
      [FILES[1].name, 'mismatch'],
      [FILES[3].name, 'missing'],
    ]);
    expect(bad.body.problems[0].found_sha256).toBe(sha256(Buffer.from('not the measurement')));
    expect((await tester.get(`/api/curves/${results[3].curve_id}/original`)).body.code).toBe('original_missing');
    // Only administrators check the archive.
    expect((await tester.post(`/api/batches/${batchId}/originals/verify`)).status).toBe(403);
  });
});

describe('re-analysis, release record and retention', () => {
  let openBatch = '';
  let openCurve = '';
  beforeAll(async () => {
    openBatch = await newBatch('Archive re-read');
    const res = await upload(openBatch, [FILES[0]]);
    openCurve = res.body.results[0].curve_id;
  });

  it('re-analyses a curve from its original, keeping the earlier fits in the history', async () => {
    const before = await tester.get(`/api/curves/${openCurve}`);
    const res = await tester.post(`/api/curves/${openCurve}/reanalyse`).send({});
    expect(res.status).toBe(200);
    expect(curveDetailSchema.safeParse(res.body).success).toBe(true);
    const oldIds = before.body.history.map((x: { fit_id: string }) => x.fit_id);
    const history = res.body.history as { fit_id: string; current: boolean; reason: string }[];
    for (const id of oldIds) expect(history.find((x) => x.fit_id === id)?.current).toBe(false);
    const fresh = history.filter((x) => x.current);
    expect(fresh.length).toBeGreaterThan(0);
    for (const x of fresh) expect(x.reason).toMatch(/^reanalysed from the original file \(analysis version \d+/);
    // The same reader on the same bytes gives the same points and figures.
    expect(res.body.points).toEqual(before.body.points);
    expect(res.body.metrics.pmp_w).toBeCloseTo(before.body.metrics.pmp_w, 12);
    expect(res.body.device_id).toBe('M2611-015');
  });

  it('keeps the file hash in the release record, refuses re-analysis of a released batch and deletion inside retention', async () => {
    const b = await newBatch('Archive released');
    const up = await upload(b, [FILES[0], FILES[2]]);
    const ids = up.body.results.map((r: { curve_id: string }) => r.curve_id);
    const spec = await qa.post('/api/specs').send({ name: 'Archive spec', limits: { pmp_w: { min: 0 } } });
    expect((await tester.post(`/api/batches/${b}/submit`).send({})).status).toBe(200);
    expect((await qa.post(`/api/batches/${b}/decision`).send({ decision: 'release', spec_id: spec.body.id })).status).toBe(200);
    const releaseId = (await qa.get(`/api/batches/${b}/reviews`)).body.releases[0].id;
    const detail = await qa.get(`/api/batches/${b}/releases/${releaseId}`);
    const byCurve = new Map(detail.body.devices.map((d: { curve_id: string; file_sha256: string }) => [d.curve_id, d.file_sha256]));
    expect([byCurve.get(ids[0]), byCurve.get(ids[1])]).toEqual([sha256(FILES[0].bytes), sha256(FILES[2].bytes)]);

    const re = await tester.post(`/api/curves/${ids[0]}/reanalyse`).send({});
    expect([re.status, re.body.code]).toEqual([409, 'batch_released']);

    expect((await admin.patch('/api/organization').send({ retention_years: 1 })).body.retention_years).toBe(1);
    const del = await admin.delete(`/api/batches/${b}/originals`);
    expect([del.status, del.body.code]).toEqual([409, 'retention_period']);
    expect(del.body.message).toMatch(/kept for 1 years, until \d{4}-\d{2}-\d{2}/);
    expect((await getBytes(tester, `/api/curves/${ids[0]}/original`)).status).toBe(200);

    // Thirteen months later the retention (1 year) has passed: the service deletes them.
    const [a] = await h.database.db.select().from(user).where(eq(user.email, `admin@${ORG}`));
    const later = new Date(Date.now() + 396 * 86_400_000);
    const gone = await deleteBatchOriginals(h.database.db, h.storage!.store, { userId: a.id, name: a.name, email: a.email, organizationId: orgId }, b, later);
    expect(gone.deleted).toBe(2);
    const after = await tester.get(`/api/curves/${ids[0]}/original`);
    expect([after.status, after.body.code]).toEqual([410, 'original_deleted']);
    expect(await h.storage!.store.list(`org/${orgId}/batch/${b}/`)).toEqual([]);
    // The release record still names the hashes.
    expect((await qa.get(`/api/batches/${b}/releases/${releaseId}`)).body.devices.map((d: { file_sha256: string }) => d.file_sha256).sort()).toEqual([sha256(FILES[0].bytes), sha256(FILES[2].bytes)].sort());
  });

  it('an administrator deletes the originals of an unreleased batch, with an audit entry; the manifest keeps the rows', async () => {
    const b = await newBatch('Archive delete');
    await upload(b, [FILES[3]]);
    expect((await tester.delete(`/api/batches/${b}/originals`)).status).toBe(403);
    const del = await admin.delete(`/api/batches/${b}/originals`);
    expect([del.status, del.body.deleted]).toEqual([200, 1]);
    const audit = await admin.get('/api/organization/audit');
    expect(audit.body.entries[0]).toMatchObject({ action: 'originals_deleted', details: { batch_id: b, batch_name: 'Archive delete', files: '1' } });
    const zip = readZip((await getBytes(tester, `/api/batches/${b}/originals.zip`)).body as Buffer);
    expect(zip.map((e) => e.name)).toEqual(['manifest.csv']);
    const rows = Papa.parse<Record<string, string>>(zip[0].bytes.toString('utf8'), { header: true }).data;
    expect(rows).toHaveLength(1);
    expect([rows[0].zip_entry, rows[0].deleted_at !== '']).toEqual(['', true]);
  });

  it('the cleanup removes objects no row points to and counts them', async () => {
    const before = await h.storage!.store.list('org/');
    const stray = originalKey(orgId, openBatch, 'ab'.repeat(32));
    await h.storage!.store.put(stray, Buffer.from('left by a crash'), 'text/plain');
    const r = await cleanOrphans(h.database.db, h.storage!.store);
    expect([r.objects, r.removed]).toEqual([before.length + 1, 1]);
    expect((await h.storage!.store.list('org/')).map((o) => o.key).sort()).toEqual(before.map((o) => o.key).sort());
  });
});

describe('the local fake written without HTTP', () => {
  it('leaves the same object file as a PUT through the S3 API, the same MD5 once read, and serves it back through it', async () => {
    const dirs = [mkdtempSync(path.join(os.tmpdir(), 'ql-direct-')), mkdtempSync(path.join(os.tmpdir(), 'ql-sdk-'))];
    const [direct, sdk] = [await openFakeStorage(dirs[0]), await openFakeStorage(dirs[1], { sdk: true })];
    try {
      const key = originalKey(orgId, 'some-batch', sha256(FILES[1].bytes));
      await direct.store.put(key, FILES[1].bytes, 'text/csv');
      await sdk.store.put(key, FILES[1].bytes, 'text/csv');
      // The files s3rver keeps for the object, by their kind (the bytes, their MD5, the metadata).
      const files = (dir: string) =>
        Object.fromEntries(
          readdirSync(dir, { recursive: true, withFileTypes: true })
            .filter((e) => e.isFile())
            .map((e) => [/\._S3rver_(.+)$/.exec(e.name)![1], [path.relative(dir, path.join(e.parentPath, e.name)), readFileSync(path.join(e.parentPath, e.name), 'latin1')]]),
        );
      const viaSdk = files(dirs[1]);
      expect(Object.keys(viaSdk).sort()).toEqual(['metadata.json', 'object', 'object.md5']);
      // Written directly: the object alone, byte for byte and at the same path (its type is in the original_file row).
      expect(files(dirs[0])).toEqual({ object: viaSdk.object });
      expect(Buffer.compare(await direct.store.get(key), FILES[1].bytes)).toBe(0);
      // s3rver made its MD5 file on that first read, the same as the PUT's.
      expect(files(dirs[0])['object.md5']).toEqual(viaSdk['object.md5']);
      expect((await direct.store.list('org/')).map((o) => [o.key, o.size])).toEqual([[key, FILES[1].bytes.length]]);
    } finally {
      await direct.stop();
      await sdk.stop();
      for (const d of dirs) rmSync(d, { recursive: true, force: true });
    }
  });
});

describe('object storage down', () => {
  let batchId = '';
  let curveId = '';
  beforeAll(async () => {
    batchId = await newBatch('Archive faults');
    curveId = (await upload(batchId, [FILES[0]])).body.results[0].curve_id;
    await h.storage!.fake!.stop();
  });

  it('refuses the upload with 503 and a message; nothing reaches the database', async () => {
    const rows = await rowsOf(batchId);
    const curves = await curvesOf(batchId);
    const res = await upload(batchId, [{ name: 'during-outage.csv', bytes: Buffer.from(cellText('OUT-001')) }]);
    expect(res.status).toBe(503);
    expect(res.body.results[0]).toMatchObject({ file: 'during-outage.csv', accepted: false, code: 'storage_unavailable', error: expect.stringContaining('Object storage is not available') });
    expect([await rowsOf(batchId), await curvesOf(batchId)]).toEqual([rows, curves]);
    const none = await h.database.db.select().from(curve).where(and(eq(curve.batchId, batchId), eq(curve.deviceId, 'OUT-001')));
    expect(none).toEqual([]);
  });

  it('answers downloads, the zip and the re-hash with 503 and a message', async () => {
    for (const res of [await tester.get(`/api/curves/${curveId}/original`), await tester.get(`/api/batches/${batchId}/originals.zip`), await admin.post(`/api/batches/${batchId}/originals/verify`)]) {
      expect(res.status).toBe(503);
      expect(res.body).toEqual({ code: 'storage_unavailable', message: expect.stringMatching(/^Object storage is not available/) });
    }
  });

  it('works again once storage is back', async () => {
    const again = await startFakeS3(h.objectsDir!, h.storage!.fake!.port);
    try {
      const res = await getBytes(tester, `/api/curves/${curveId}/original`);
      expect(Buffer.compare(res.body as Buffer, FILES[0].bytes)).toBe(0);
    } finally {
      await again.stop();
    }
  });
});
