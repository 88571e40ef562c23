/**
 * How an upload arrives (server/upload-receiver.ts, server/upload-storage.ts): small files in
 * memory within the process's budget and the rest streamed to a temporary folder, within the
 * per-request caps (413 before the body is read on), one bad part is that file's rejection with
 * the good files before and after it stored, a client that goes away stops the files not yet
 * started, and afterwards the temporary folder is empty and the memory given back in every case.
 */
import fs from 'node:fs';
import net from 'node:net';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import type { Express } from 'express';
import request from 'supertest';
import { openDatabase } from '@/db/client';
import type { Database } from '@/db/client';
import { curve } from '@/db/schema';
import { simulateCurve } from '@/lib/iv';
import { createApp } from '@/server/app';
import { createAuth } from '@/server/auth';
import { createMailer } from '@/server/mail';
import { inlineAnalyser } from '@/server/services/analysis-pool';
import type { Analyser } from '@/server/services/analysis-pool';
import { UPLOAD_LIMITS } from '@/server/upload-receiver';
import type { UploadLimits } from '@/server/upload-receiver';
import type { MemoryBudget } from '@/server/upload-storage';
import { adoptApp, BASE_URL, signUp } from '@/tests/server/harness';

/** The benchmark cell simulated from its published optimum (tests/fixtures/reference-data/README.md). */
const cellRows = (() => {
  const c = simulateCurve({ iph_a: 0.760788, i0_a: 3.1068e-7, n: 1.47727, rs_ohm: 0.036547, rsh_ohm: 52.89 }, { cells: 1, temp_c: 33, points: 30 });
  return ['V,I', ...c.voltage_v.map((v, k) => `${v},${c.current_a[k]}`)].join('\n');
})();
const cellFile = (device?: string) => Buffer.from((device ? `# device: ${device}\n` : '') + cellRows);

/** An app like the harness's with its own upload folder, caps and analyser. */
async function uploadApp(opts: { limits?: Partial<UploadLimits>; analyser?: Analyser } = {}) {
  const database: Database = await openDatabase('memory');
  const outboxDir = fs.mkdtempSync(path.join(os.tmpdir(), 'ql-up-outbox-'));
  const uploadDir = fs.mkdtempSync(path.join(os.tmpdir(), 'ql-up-tmp-'));
  const mailer = createMailer({ db: database.db, outboxDir });
  const auth = createAuth({ db: database.db, mailer, baseURL: BASE_URL, secret: 'test-secret-0123456789abcdef0123456789abcdef', trustedOrigins: [BASE_URL], signInPerMinute: 0, logLevel: 'error' });
  const app = createApp({ db: database.db, auth, mailer, uploadDir, uploadLimits: { ...UPLOAD_LIMITS, ...opts.limits }, analyser: opts.analyser });
  adoptApp({ app, database, auth, mailer, outboxDir });
  await signUp(app, { email: 'admin@upload-pv.example' });
  const tester = await signUp(app, { email: 'tester@upload-pv.example' });
  const batchId: string = (await tester.post('/api/batches').send({ name: 'Receiving', cells: 1 })).body.id;
  batchOf.set(app, batchId);
  const signIn = await request(app).post('/api/auth/sign-in/email').set('Origin', BASE_URL).send({ email: 'tester@upload-pv.example', password: 'correct-horse-9' });
  const cookie = ([] as string[]).concat(signIn.headers['set-cookie'] ?? []).map((c) => c.split(';')[0]).join('; ');
  return {
    app,
    database,
    tester,
    cookie,
    batchId,
    uploadDir,
    /** Files left in the upload folder. */
    leftovers: () => fs.readdirSync(uploadDir),
    /** Bytes the uploads hold in memory. */
    held: () => (app.locals.uploadMemory as MemoryBudget).used,
    /** Nothing left on disk or in memory. */
    clean: () => fs.readdirSync(uploadDir).length === 0 && (app.locals.uploadMemory as MemoryBudget).used === 0,
    stored: async () => (await database.db.select({ fileName: curve.fileName, deviceId: curve.deviceId }).from(curve).where(eq(curve.batchId, batchId))).map((r) => r.fileName).sort(),
    close: async () => {
      await database.close();
      fs.rmSync(outboxDir, { recursive: true, force: true });
      fs.rmSync(uploadDir, { recursive: true, force: true });
    },
  };
}

/** A multipart body written byte by byte, so names can hold what form libraries would not send. */
function multipart(parts: { filename?: Buffer | string; content: Buffer; rawHeader?: Buffer }[], boundary = 'QLBOUNDARY7') {
  const chunks: Buffer[] = [];
  for (const p of parts) {
    chunks.push(Buffer.from(`--${boundary}\r\n`));
    if (p.rawHeader) chunks.push(p.rawHeader);
    else chunks.push(Buffer.concat([Buffer.from('Content-Disposition: form-data; name="files"; filename="'), Buffer.from(p.filename ?? ''), Buffer.from('"\r\nContent-Type: text/csv\r\n\r\n')]));
    chunks.push(p.content, Buffer.from('\r\n'));
  }
  chunks.push(Buffer.from(`--${boundary}--\r\n`));
  return { body: Buffer.concat(chunks), type: `multipart/form-data; boundary=${boundary}` };
}

/** Waits until `check` holds (the server finishes its clean-up after the answer or the disconnect). */
async function eventually(check: () => boolean | Promise<boolean>, ms = 10_000) {
  const end = Date.now() + ms;
  while (!(await check())) {
    if (Date.now() > end) throw new Error('condition not reached in time');
    await new Promise((r) => setTimeout(r, 50));
  }
}

/** The app on a loopback port and a raw socket to it, for bodies a client library would not send. */
async function rawClient(app: Express, cookie: string) {
  const server = app.listen(0, '127.0.0.1');
  await new Promise((r) => server.once('listening', r));
  const { port } = server.address() as AddressInfo;
  const socket = net.connect(port, '127.0.0.1');
  await new Promise((r) => socket.once('connect', r));
  let received = '';
  socket.on('data', (d) => (received += d));
  socket.on('error', () => undefined);
  return {
    socket,
    head: (type: string, extra: Record<string, string>) =>
      `POST ${'/api/batches/'}${batchOf.get(app)}/curves HTTP/1.1\r\nHost: 127.0.0.1\r\nCookie: ${cookie}\r\nContent-Type: ${type}\r\n${Object.entries(extra).map(([k, v]) => `${k}: ${v}\r\n`).join('')}\r\n`,
    answer: async () => {
      await eventually(() => received.includes('\r\n\r\n{') && received.trim().endsWith('}'));
      return received;
    },
    close: async () => {
      socket.destroy();
      server.closeAllConnections();
      await new Promise((r) => server.close(r));
    },
  };
}
const batchOf = new WeakMap<Express, string>();

// Each app opens PGlite and hashes passwords: slow on a busy 2-core machine.
jest.setTimeout(240_000);

/** The app with the default caps (small files in memory), shared by the tests that do not need their own. */
let main: Awaited<ReturnType<typeof uploadApp>>;
/** An app with small byte caps that writes every file to disk. */
let small: Awaited<ReturnType<typeof uploadApp>>;
beforeAll(async () => {
  main = await uploadApp();
  small = await uploadApp({ limits: { totalBytes: 64 * 1024, fileBytes: 16 * 1024, memoryBytes: 0 } });
});
afterAll(async () => {
  await main?.close();
  await small?.close();
});

type Result = { file: string; accepted: boolean; code?: string; error?: string; curveId?: string };

describe('one bad part among good files', () => {
  let u: Awaited<ReturnType<typeof uploadApp>>;
  beforeAll(() => {
    u = main;
  });

  it('a name that is not UTF-8, a tab, an escape character or a NUL in a name, a NUL in the content, an unreadable part header and a too long device id are each that file’s rejection; the good files before and after are stored; the folder is empty', async () => {
    const { body, type } = multipart([
      { filename: 'good-1.csv', content: cellFile('GOOD-1') },
      { filename: Buffer.concat([Buffer.from('latin-'), Buffer.from([0xe9, 0xff]), Buffer.from('.csv')]), content: cellFile('BAD-LATIN') },
      { filename: 'good-2.csv', content: cellFile('GOOD-2') },
      { filename: 'tab\there.csv', content: cellFile('BAD-TAB') },
      { filename: 'esc-\u001b[31m.csv', content: cellFile('BAD-ESC') },
      { filename: 'nul-content.csv', content: Buffer.concat([cellFile('BAD-NUL').subarray(0, 40), Buffer.from([0]), cellFile().subarray(40)]) },
      { rawHeader: Buffer.concat([Buffer.from('Content-Disposition: form-data; name="files"; filename="nul'), Buffer.from([0]), Buffer.from('.csv"\r\n\r\n')]), content: cellFile('BAD-NUL-NAME') },
      { filename: 'long-id.csv', content: cellFile('X'.repeat(121)) },
      { filename: 'good-3.csv', content: cellFile('GOOD-3') },
    ]);
    const res = await u.tester.post(`/api/batches/${u.batchId}/curves`).set('Content-Type', type).send(body);
    expect(res.status).toBe(201);
    const results = res.body.results as Result[];
    expect(results.map((r) => [r.accepted, r.code ?? 'stored'])).toEqual([
      [true, 'stored'],
      [false, 'bad_file_name'],
      [true, 'stored'],
      [false, 'bad_file_name'],
      [false, 'unreadable_part'],
      [false, 'binary'],
      [false, 'unreadable_part'],
      [false, 'bad_device_id'],
      [true, 'stored'],
    ]);
    expect(results[1].error).toMatch(/is not valid UTF-8/);
    expect(results[3].error).toMatch(/control character/);
    expect(results[3].file).not.toMatch(/\u001b/);
    expect(results[4].error).toMatch(/header that cannot be read/);
    expect(results[6].error).toMatch(/header that cannot be read/);
    expect(results[7].error).toMatch(/longer than 120 characters/);
    expect(res.body).toEqual(expect.objectContaining({ accepted: 3, rejected: 6 }));
    expect(await u.stored()).toEqual(['good-1.csv', 'good-2.csv', 'good-3.csv']);
    await eventually(() => u.clean());
  });

  it('a UTF-8 name with accents and an emoji is kept as sent', async () => {
    const name = 'Modul-Ä-🔆.csv';
    const { body, type } = multipart([{ filename: Buffer.from(name, 'utf8'), content: cellFile('UTF8-NAME') }]);
    const res = await u.tester.post(`/api/batches/${u.batchId}/curves`).set('Content-Type', type).send(body);
    expect(res.status).toBe(201);
    expect(res.body.results[0].file).toBe(name);
    await eventually(() => u.clean());
  });
});

describe('caps per request', () => {
  let u: Awaited<ReturnType<typeof uploadApp>>;
  beforeAll(() => {
    u = small;
  });
  afterEach(async () => {
    expect(await u.stored()).toEqual([]);
    await eventually(() => u.clean());
  });

  it(`${UPLOAD_LIMITS.files + 1} files (the default cap is ${UPLOAD_LIMITS.files}) → 413 too_many_files, nothing stored`, async () => {
    // Default caps for the count (the app with small caps here limits bytes only).
    const before = await main.stored();
    const { body, type } = multipart(Array.from({ length: UPLOAD_LIMITS.files + 1 }, (_, k) => ({ filename: `f${k}.csv`, content: Buffer.from('V,I\n0,1\n') })));
    const res = await main.tester.post(`/api/batches/${main.batchId}/curves`).set('Content-Type', type).send(body);
    expect(res.status).toBe(413);
    expect(res.body).toEqual({ code: 'too_many_files', message: expect.stringMatching(/At most 2000 files per upload; nothing was stored/) });
    expect(await main.stored()).toEqual(before);
    await eventually(() => main.clean());
  });

  it('a body larger than the byte cap (64 KB here) → 413 upload_too_large before it is read', async () => {
    const { body, type } = multipart(Array.from({ length: 10 }, (_, k) => ({ filename: `b${k}.csv`, content: Buffer.alloc(7000, 0x31) })));
    expect(body.length).toBeGreaterThan(64 * 1024);
    const res = await u.tester.post(`/api/batches/${u.batchId}/curves`).set('Content-Type', type).send(body);
    expect(res.status).toBe(413);
    expect(res.body.code).toBe('upload_too_large');
    expect(res.body.message).toMatch(/at most 0\.0625 MB/);
  });

  it('one file above the file cap (16 KB here) → 413 file_too_large, the files before it removed', async () => {
    const { body, type } = multipart([
      { filename: 'small.csv', content: cellFile('S') },
      { filename: 'big.csv', content: Buffer.alloc(20 * 1024, 0x31) },
    ]);
    const res = await u.tester.post(`/api/batches/${u.batchId}/curves`).set('Content-Type', type).send(body);
    expect(res.status).toBe(413);
    expect(res.body.code).toBe('file_too_large');
  });

  it('a multipart upload without a Content-Length (chunked) → 411', async () => {
    const { body, type } = multipart([{ filename: 'chunked.csv', content: cellFile('C') }]);
    const raw = await rawClient(u.app, u.cookie);
    try {
      raw.socket.write(raw.head(type, { 'Transfer-Encoding': 'chunked' }));
      raw.socket.write(`${body.length.toString(16)}\r\n`);
      raw.socket.write(body);
      raw.socket.write('\r\n0\r\n\r\n');
      const answer = await raw.answer();
      expect(answer).toMatch(/^HTTP\/1\.1 411/);
      expect(answer).toMatch(/"code":"length_required"/);
    } finally {
      await raw.close();
    }
  });
});

describe('a client that goes away', () => {
  it.each([
    ['on disk', 'leftovers'],
    ['in memory', 'held'],
  ] as const)('half-way through sending (files %s): the files already received are removed', async (_where, kept) => {
    const u = kept === 'leftovers' ? small : main;
    const before = await u.stored();
    {
      const { body, type } = multipart(Array.from({ length: 40 }, (_, k) => ({ filename: `h${k}.csv`, content: cellFile(`H-${k}`) })));
      const raw = await rawClient(u.app, u.cookie);
      try {
        raw.socket.write(raw.head(type, { 'Content-Length': String(body.length) }));
        raw.socket.write(body.subarray(0, Math.floor(body.length * 0.6)));
        // Some files are received before the client disappears.
        await eventually(() => (kept === 'leftovers' ? u.leftovers().length : u.held()) > 0);
        if (kept === 'held') expect(u.leftovers()).toEqual([]);
        raw.socket.destroy();
        await eventually(() => u.clean());
      } finally {
        await raw.close();
      }
      expect(await u.stored()).toEqual(before);
    }
  });

  it('while files are being fitted: the files not yet started are never analysed and the folder is emptied', async () => {
    let analysed = 0;
    const inline = inlineAnalyser();
    // A slow analyser (40 ms a file) so the upload is still running when the client leaves.
    const slow: Analyser = { threads: 0, close: async () => undefined, analyse: async (req) => (analysed++, await new Promise((r) => setTimeout(r, 40)), inline.analyse(req)) };
    const u = await uploadApp({ analyser: slow });
    try {
      const total = 300;
      const { body, type } = multipart(Array.from({ length: total }, (_, k) => ({ filename: `g${k}.csv`, content: cellFile(`G-${k}`) })));
      const pending = u.tester.post(`/api/batches/${u.batchId}/curves`).set('Content-Type', type).send(body);
      const outcome = pending.then(
        () => 'answered',
        () => 'aborted',
      );
      await eventually(() => analysed > 10);
      pending.abort();
      expect(await outcome).toBe('aborted');
      await eventually(() => u.clean());
      const seen = analysed;
      await new Promise((r) => setTimeout(r, 500));
      // At most the window ahead of the store step (64 files) was started after the abort.
      expect(analysed).toBe(seen);
      expect(analysed).toBeLessThan(total / 2);
      expect((await u.stored()).length).toBeLessThan(total / 2);
    } finally {
      await u.close();
    }
  });
});

describe('memory or disk', () => {
  it('files up to the in-memory size are held in memory within the budget, the rest are on disk while they are analysed; all are stored and nothing is left', async () => {
    const seen: { onDisk: number; held: number }[] = [];
    const inline = inlineAnalyser();
    let u: Awaited<ReturnType<typeof uploadApp>> | undefined;
    const watching: Analyser = { threads: 0, close: async () => undefined, analyse: async (req) => (seen.push({ onDisk: u!.leftovers().length, held: u!.held() }), inline.analyse(req)) };
    const small = cellFile('SMALL-1');
    // A budget for two small files; files above 2 kB never in memory.
    u = await uploadApp({ limits: { memoryBytes: 2 * small.length + 10, memoryFileBytes: 2048 }, analyser: watching });
    try {
      const big = Buffer.concat([Buffer.from('# device: BIG\n# ' + 'x'.repeat(3000) + '\n'), Buffer.from(cellRows)]);
      const { body, type } = multipart([
        { filename: 's1.csv', content: small },
        { filename: 's2.csv', content: cellFile('SMALL-2') },
        { filename: 's3.csv', content: cellFile('SMALL-3') },
        { filename: 'big.csv', content: big },
      ]);
      const res = await u.tester.post(`/api/batches/${u.batchId}/curves`).set('Content-Type', type).send(body);
      expect(res.status).toBe(201);
      expect(res.body.accepted).toBe(4);
      // The third small file found the budget used up and the big one is above the in-memory size.
      expect(seen[0]).toEqual({ onDisk: 2, held: small.length + cellFile('SMALL-2').length });
      expect(await u.stored()).toEqual(['big.csv', 's1.csv', 's2.csv', 's3.csv']);
      await eventually(() => u!.clean());
    } finally {
      await u.close();
    }
  });
});
