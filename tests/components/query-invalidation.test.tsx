/**
 * Every mutation in lib/api marks stale what it changes on the server, so no screen keeps an old
 * answer: the comparison grid after an upload, a refit or a release; a curve's physics after its
 * refit; the outbox after a decision mails someone. The server is outside: fetch is stubbed.
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import type { QueryKey } from '@tanstack/react-query';
import { act, renderHook, waitFor } from '@testing-library/react-native';
import type { ReactNode } from 'react';
import { batchKeys, curveKeys, useAfterUpload, useCreateBatch, useRefit, useUpdateBatch } from '@/lib/api/batches';
import { useDeleteOriginals, useReanalyse, useSetRetention } from '@/lib/api/originals';
import { outboxKeys } from '@/lib/api/outbox';
import { physicsKeys } from '@/lib/api/physics';
import { qualityKeys, specKeys, useComparison, useDecision, useReopen, useSaveSpec, useSubmitBatch } from '@/lib/api/quality';
import { sessionKeys, useRequestPasswordReset, useSignIn } from '@/lib/api/session';
import { stationKeys, useCreateStation, useRevokeStation } from '@/lib/api/stations';
import { setupKeys, useSaveSetup } from '@/lib/api/setups';
import { useCancelInvitation, useChangeRole, useDecideRequest, useInvite, useRemoveMember, useSetJoinByDomain, useSetMemberActive, userKeys } from '@/lib/api/users';

const page = { page: 1, page_size: 50, sort: 'device_id', dir: 'asc', q: '' } as const;

/** What a client may hold while someone works on batch b1 (curve c1 belongs to b1, curve c9 to another batch, b3). */
const cached = {
  batchList: batchKeys.list(),
  b1: batchKeys.detail('b1'),
  b1Curves: batchKeys.curves('b1', page),
  b1Overlay: batchKeys.overlay('b1'),
  b1Evaluation: qualityKeys.evaluation('b1', 's1'),
  b1Reviews: qualityKeys.reviews('b1'),
  compareB1B2: qualityKeys.compare(['b1', 'b2'], 's1', 'pmp_w'),
  compareB2B1NoSpec: qualityKeys.compare(['b2', 'b1'], '', 'ff'),
  compareB3: qualityKeys.compare(['b3'], '', 'pmp_w'),
  b3: batchKeys.detail('b3'),
  b3Evaluation: qualityKeys.evaluation('b3', 's1'),
  c1: curveKeys.detail('c1'),
  c1Physics: physicsKeys.curve('c1'),
  c9: curveKeys.detail('c9'),
  c9Physics: physicsKeys.curve('c9'),
  material: physicsKeys.material(300),
  specList: specKeys.list(),
  spec: specKeys.detail('s1'),
  setups: setupKeys.list(),
  outbox: outboxKeys.list(),
  users: userKeys.list(),
  invitations: userKeys.invitations(),
  requests: userKeys.requests(),
  audit: userKeys.audit(),
  me: sessionKeys.me(),
  stations: stationKeys.list(),
} satisfies Record<string, QueryKey>;
type Name = keyof typeof cached;

/** Cached answers in the shapes the curve pages hold (GET /api/curves/:id, GET /api/physics/curves/:id). */
const seeds: Partial<Record<Name, unknown>> = {
  c1: { id: 'c1', batch: { id: 'b1', name: 'Lot 2611', state: 'open' } },
  c1Physics: { curve: { id: 'c1', batch: { id: 'b1', name: 'Lot 2611' } } },
  c9: { id: 'c9', batch: { id: 'b3', name: 'Lot 2613', state: 'open' } },
  c9Physics: { curve: { id: 'c9', batch: { id: 'b3', name: 'Lot 2613' } } },
};

/** A stubbed server: every call answers 200 with a body fit for its path. */
function stubFetch() {
  const calls: string[] = [];
  const fetchMock = jest.fn(async (url: string, init?: { method?: string }) => {
    calls.push(`${init?.method ?? 'GET'} ${url}`);
    const body = url.includes('/refit') || url.includes('/reanalyse')
      ? { id: 'c1', batch_id: 'b1', device_id: 'D1', fits: [] }
      : url.startsWith('/api/compare')
        ? { batches: [], spec: null, param: 'pmp_w', tables: [], outliers: [], stats: {}, counts: {}, differences: [] }
        : { id: 'x', ok: true };
    return { ok: true, status: 200, text: async () => JSON.stringify(body) };
  });
  global.fetch = fetchMock as unknown as typeof fetch;
  return calls;
}

function seededClient() {
  // gcTime Infinity: no garbage-collection timers left running when a test ends.
  const qc = new QueryClient({ defaultOptions: { queries: { retry: false, staleTime: Infinity, gcTime: Infinity }, mutations: { gcTime: Infinity } } });
  for (const [name, key] of Object.entries(cached)) qc.setQueryData(key, seeds[name as Name] ?? { seeded: true });
  const wrapper = ({ children }: { children: ReactNode }) => <QueryClientProvider client={qc}>{children}</QueryClientProvider>;
  return { qc, wrapper };
}

const invalid = (qc: QueryClient, name: Name) => qc.getQueryState(cached[name])?.isInvalidated === true;

type Case = { what: string; run: (wrapper: ({ children }: { children: ReactNode }) => ReactNode) => Promise<void>; stale: Name[]; fresh: Name[]; also?: (qc: QueryClient) => void };

/** Runs a mutation hook's mutateAsync inside act. */
async function mutate<V>(hook: () => { mutateAsync: (v: V) => Promise<unknown> }, input: V, wrapper: ({ children }: { children: ReactNode }) => ReactNode) {
  const { result } = renderHook(hook, { wrapper });
  await act(async () => {
    await result.current.mutateAsync(input);
  });
}

const batchData: Name[] = ['batchList', 'b1', 'b1Curves', 'b1Overlay', 'b1Evaluation', 'compareB1B2', 'compareB2B1NoSpec', 'c1', 'c1Physics'];

const cases: Case[] = [
  {
    what: 'making a station key',
    run: (wrapper) => mutate(() => useCreateStation(), 'Line 2 flasher', wrapper),
    stale: ['stations'],
    fresh: ['batchList', 'b1', 'users', 'outbox', 'me'],
  },
  {
    what: 'revoking a station key',
    run: (wrapper) => mutate(() => useRevokeStation(), 'st1', wrapper),
    stale: ['stations'],
    fresh: ['batchList', 'b1', 'users', 'outbox', 'me'],
  },
  {
    what: 'an upload into b1',
    run: async (wrapper) => {
      const { result } = renderHook(() => useAfterUpload('b1'), { wrapper });
      await act(async () => {
        await result.current();
      });
    },
    stale: batchData,
    fresh: ['compareB3', 'b3', 'b3Evaluation', 'c9', 'c9Physics', 'specList', 'material', 'users'],
  },
  {
    what: 'a refit of curve c1 (of b1)',
    run: (wrapper) => mutate(() => useRefit('c1'), { model: 'single', temp_c: '50' }, wrapper),
    stale: ['c1Physics', 'batchList', 'b1', 'b1Curves', 'b1Overlay', 'b1Evaluation', 'compareB1B2', 'compareB2B1NoSpec'],
    // The refit's answer is the curve itself: written into the cache rather than fetched again.
    fresh: ['c1', 'compareB3', 'b3', 'b3Evaluation', 'c9', 'c9Physics', 'specList', 'material'],
    also: (qc) => expect(qc.getQueryData(cached.c1)).toEqual({ id: 'c1', batch_id: 'b1', device_id: 'D1', fits: [], batch: { id: 'b1', name: 'Lot 2611', state: 'open' } }),
  },
  {
    what: 'a re-analysis of curve c1 (of b1) from its original file',
    run: (wrapper) => mutate(() => useReanalyse('c1'), undefined, wrapper),
    stale: ['c1Physics', 'batchList', 'b1', 'b1Curves', 'b1Overlay', 'b1Evaluation', 'compareB1B2', 'compareB2B1NoSpec'],
    // The answer is the curve itself, written into the cache.
    fresh: ['c1', 'compareB3', 'b3', 'b3Evaluation', 'c9', 'c9Physics', 'specList', 'material'],
    also: (qc) => expect(qc.getQueryData(cached.c1)).toEqual({ id: 'c1', batch_id: 'b1', device_id: 'D1', fits: [] }),
  },
  {
    what: "deleting b1's original files",
    run: (wrapper) => mutate(() => useDeleteOriginals('b1'), undefined, wrapper),
    // The curve pages say whether their file is kept; the audit list records the deletion.
    stale: [...batchData, 'audit'],
    fresh: ['compareB3', 'b3', 'c9', 'c9Physics', 'specList', 'users'],
  },
  {
    what: 'releasing b1',
    run: (wrapper) => mutate(() => useDecision('b1'), { decision: 'release', spec_id: 's1', comment: '' }, wrapper),
    stale: [...batchData, 'b1Reviews', 'outbox'],
    fresh: ['compareB3', 'b3', 'b3Evaluation', 'c9', 'c9Physics', 'specList', 'material'],
  },
  {
    what: 'holding b1',
    run: (wrapper) => mutate(() => useDecision('b1'), { decision: 'hold', spec_id: 's1', comment: 'Rs too high' }, wrapper),
    stale: [...batchData, 'b1Reviews', 'outbox'],
    fresh: ['compareB3', 'b3', 'specList'],
  },
  {
    what: 'reopening b1',
    run: (wrapper) => mutate(() => useReopen('b1'), 'Customer found a mislabelled cell.', wrapper),
    stale: [...batchData, 'b1Reviews', 'outbox'],
    fresh: ['compareB3', 'b3', 'specList'],
  },
  {
    what: 'submitting b1 for review',
    run: (wrapper) => mutate(() => useSubmitBatch('b1'), '', wrapper),
    stale: [...batchData, 'b1Reviews', 'outbox'],
    fresh: ['compareB3', 'b3', 'specList'],
  },
  {
    what: 'renaming b1',
    run: (wrapper) => mutate(() => useUpdateBatch('b1'), { name: 'Lot 2611 (retested)' }, wrapper),
    stale: batchData,
    fresh: ['compareB3', 'b3', 'c9', 'specList'],
  },
  {
    what: 'creating a batch',
    run: (wrapper) => mutate(() => useCreateBatch(), { name: 'New lot' }, wrapper),
    stale: ['batchList'],
    // A new batch is in no comparison and no other batch's figures.
    fresh: ['b1', 'compareB1B2', 'compareB3', 'c1'],
  },
  {
    what: 'saving a spec',
    run: (wrapper) => mutate(() => useSaveSpec(), { name: 'Module release', limits: { pmp_w: { min: 300 } } }, wrapper),
    stale: ['specList', 'spec'],
    // A save adds a version with a new id; the answers cached under an existing spec id stay true.
    fresh: ['b1Evaluation', 'compareB1B2', 'batchList'],
  },
  {
    what: 'editing a measurement setup',
    run: (wrapper) => mutate(() => useSaveSetup(), { id: 'm1', name: 'Line 1 tester', components: [] }, wrapper),
    // Its budget gives the figures of every batch measured with it their uncertainty: every answer about batches and curves.
    stale: ['setups', ...batchData, 'compareB3', 'b3', 'b3Evaluation', 'c9'],
    fresh: ['specList', 'spec', 'material', 'users'],
  },
  {
    what: 'changing a role',
    run: (wrapper) => mutate(() => useChangeRole(), { userId: 'u1', role: 'designer' }, wrapper),
    // The admin may have changed their own role, and with it what /api/me permits; the record grows.
    stale: ['users', 'me', 'audit'],
    fresh: ['batchList', 'compareB1B2'],
  },
  // Every membership change is recorded and most mail someone: the users screen, the record and the outbox.
  ...(
    [
      ['inviting someone', (w) => mutate(() => useInvite(), { email: 'x@example.com', role: 'designer' }, w)],
      ['withdrawing an invitation', (w) => mutate(() => useCancelInvitation(), 'i1', w)],
      ['approving a request to join', (w) => mutate(() => useDecideRequest(), { id: 'r1', decision: 'approve', role: 'qa_lead' }, w)],
      ['deactivating a member', (w) => mutate(() => useSetMemberActive(), { userId: 'u1', active: false }, w)],
      ['removing a member', (w) => mutate(() => useRemoveMember(), 'u1', w)],
      ['turning joining by domain on', (w) => mutate(() => useSetJoinByDomain(), true, w)],
      ['setting the retention of original files', (w) => mutate(() => useSetRetention(), 5, w)],
    ] as const satisfies readonly (readonly [string, Case['run']])[]
  ).map(([what, run]): Case => ({ what, run, stale: ['users', 'invitations', 'requests', 'audit', 'me', 'outbox'], fresh: ['batchList', 'compareB1B2', 'specList'] })),
  {
    what: 'asking for a password reset',
    run: (wrapper) => mutate(() => useRequestPasswordReset(), 'dana@example.com', wrapper),
    stale: ['outbox'],
    fresh: ['users', 'batchList'],
  },
];

describe('mutations invalidate what they change', () => {
  const realFetch = global.fetch;
  afterEach(() => {
    global.fetch = realFetch;
  });

  it.each(cases.map((c) => [c.what, c] as const))('%s', async (_what, c) => {
    stubFetch();
    const { qc, wrapper } = seededClient();
    await c.run(wrapper);
    c.also?.(qc);
    const staleNow = (Object.keys(cached) as Name[]).filter((n) => invalid(qc, n));
    expect(staleNow).toEqual(expect.arrayContaining(c.stale));
    for (const n of c.fresh) expect([n, invalid(qc, n)]).toEqual([n, false]);
  });

  it('signing in drops what the previous account had cached and fetches the session again', async () => {
    stubFetch();
    const { qc, wrapper } = seededClient();
    await mutate(() => useSignIn(), { email: 'dana@example.com', password: 'long enough' }, wrapper);
    expect(qc.getQueryState(cached.me)?.isInvalidated).toBe(true);
    for (const n of ['batchList', 'compareB1B2', 'c1', 'users', 'outbox'] as const) expect([n, qc.getQueryState(cached[n])]).toEqual([n, undefined]);
  });

  it('the comparison on screen is fetched again after a release of one of its batches', async () => {
    const calls = stubFetch();
    const { wrapper } = seededClient();
    const compareCalls = () => calls.filter((c) => c.startsWith('GET /api/compare')).length;
    const { result } = renderHook(() => ({ grid: useComparison(['b1', 'b2'], 's1', 'pmp_w'), decide: useDecision('b1') }), { wrapper });
    // Seeded and fresh (staleTime Infinity): nothing fetched yet.
    expect(compareCalls()).toBe(0);
    await act(async () => {
      await result.current.decide.mutateAsync({ decision: 'release', spec_id: 's1', comment: '' });
    });
    await waitFor(() => expect(compareCalls()).toBe(1));
  });
});
