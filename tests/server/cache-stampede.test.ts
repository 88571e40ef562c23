/**
 * Many requests for one answer that is not cached yet compute it once (lru-cache's fetch shares
 * the computation between concurrent misses), and the caches keep their bounds. Counted through
 * seams (the computation passed in, a module function, the auth API), never by timing.
 */
import { createServer } from 'node:http';
import type { Server } from 'node:http';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { REFERENCE_DATA_DIR } from '@/tests/support/reference-data';
import request from 'supertest';
import * as quality from '@/server/services/quality';
import { AnswerCache } from '@/server/services/answer-cache';
import { signUp, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';

const REF = REFERENCE_DATA_DIR;
const cellCsv = readFileSync(path.join(REF, 'cell-57mm-33C.csv'), 'utf8');
const N = 12;

/** A promise to settle from outside, so every request is surely waiting before the computation ends. */
function deferred<T>() {
  let resolve!: (v: T) => void;
  let reject!: (e: unknown) => void;
  const promise = new Promise<T>((res, rej) => ((resolve = res), (reject = rej)));
  return { promise, resolve, reject };
}

describe('AnswerCache', () => {
  it(`computes a cold answer once for ${N} concurrent requests, and serves the same bytes to all`, async () => {
    const cache = new AnswerCache();
    const gate = deferred<void>();
    let calls = 0;
    const compute = async () => {
      calls++;
      await gate.promise;
      return { answer: 42 };
    };
    const pending = Array.from({ length: N }, () => cache.get('batch@1:summary', compute));
    gate.resolve();
    const bodies = await Promise.all(pending);
    expect(calls).toBe(1);
    for (const b of bodies) expect(b).toBe(bodies[0]);
    expect(JSON.parse(bodies[0].toString())).toEqual({ answer: 42 });
    // Warm: no computation at all.
    await cache.get('batch@1:summary', compute);
    expect(calls).toBe(1);
  });

  it('gives every waiting request the error of a failed computation, and keeps nothing', async () => {
    const cache = new AnswerCache();
    const gate = deferred<unknown>();
    let calls = 0;
    const failing = async () => {
      calls++;
      return gate.promise;
    };
    const pending = Array.from({ length: N }, () => cache.get('k', failing).then(() => 'ok', (e: Error) => e.message));
    gate.reject(new Error('database gone'));
    expect(await Promise.all(pending)).toEqual(new Array(N).fill('database gone'));
    expect(calls).toBe(1);
    expect(cache.size).toBe(0);
    expect((await cache.get('k', async () => 'second try')).toString()).toBe('"second try"');
  });

  it('keeps at most maxBytes, least recently used dropped first; a larger answer is sent but not kept', async () => {
    const cache = new AnswerCache(100);
    const body = (ch: string) => async () => Buffer.from(ch.repeat(40)); // 40 bytes each
    await cache.get('a', body('a'));
    await cache.get('b', body('b'));
    await cache.get('a', body('x')); // a is now the most recently used
    await cache.get('c', body('c')); // 120 bytes > 100: b goes
    expect(cache.bytes).toBeLessThanOrEqual(100);
    expect((await cache.get('a', body('y'))).toString()).toBe('a'.repeat(40));
    expect((await cache.get('b', body('z'))).toString()).toBe('z'.repeat(40)); // computed again
    const big = await cache.get('big', async () => Buffer.alloc(500, 1));
    expect(big.length).toBe(500);
    expect(cache.bytes).toBeLessThanOrEqual(100);
  });
});

describe('through the app', () => {
  let h: Harness;
  let server: Server;
  let cookie: string;
  let batchId: string;

  beforeAll(async () => {
    h = await startHarness({ sessionCacheMs: 60_000 });
    await signUp(h.app, { email: 'admin@stampede-pv.example' }); // the first of a domain administers it
    const tester = await signUp(h.app, { email: 'tester@stampede-pv.example' });
    batchId = (await tester.post('/api/batches').send({ name: 'Stampede', cells: 1 })).body.id;
    let up = tester.post(`/api/batches/${batchId}/curves`).field('temp_c', '33');
    for (const k of [1, 2, 3]) up = up.attach('files', Buffer.from(`# device: S-${k}\n${cellCsv}`), `s${k}.csv`);
    expect((await up).body.accepted).toBe(3);
    const signIn = await request(h.app).post('/api/auth/sign-in/email').set('Origin', 'http://localhost:8080').send({ email: 'tester@stampede-pv.example', password: 'correct-horse-9' });
    cookie = ([] as string[]).concat(signIn.headers['set-cookie'] ?? []).map((c) => c.split(';')[0]).join('; ');
    // One listening server for all requests, so they really overlap.
    server = createServer(h.app);
    await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  });
  afterAll(async () => {
    await new Promise((r) => server.close(r));
    await h.close();
  });
  afterEach(() => jest.restoreAllMocks());

  it(`resolves one session once for ${N} concurrent requests with its cookie`, async () => {
    // A sign-in attempt (a POST under /api/auth) empties the caller cache.
    await request(server).post('/api/auth/sign-in/email').set('Origin', 'http://localhost:8080').send({ email: 'nobody@stampede-pv.example', password: 'wrong-password' });
    const getSession = jest.spyOn(h.auth.api, 'getSession');
    const answers = await Promise.all(Array.from({ length: N }, () => request(server).get('/api/me').set('Cookie', cookie)));
    expect(answers.map((a) => a.status)).toEqual(new Array(N).fill(200));
    expect(getSession).toHaveBeenCalledTimes(1);
  });

  it(`reads a cold batch's device records once for ${N} concurrent comparisons`, async () => {
    const records = jest.spyOn(quality, 'deviceRecords');
    const answers = await Promise.all(Array.from({ length: N }, () => request(server).get(`/api/compare?batches=${batchId}&param=pmp_w`).set('Cookie', cookie)));
    expect(answers.map((a) => a.status)).toEqual(new Array(N).fill(200));
    expect(answers.every((a) => a.text === answers[0].text)).toBe(true);
    expect(answers[0].body.batches[0].count).toBe(3);
    expect(records).toHaveBeenCalledTimes(1);
  });
});
