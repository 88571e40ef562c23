/**
 * The access matrix: every API route × {signed out, test_engineer, designer, qa_lead, admin, a
 * member of another organisation}. Each route is listed with the permission it needs; the
 * expected status of each cell is derived from the role table (lib/auth/roles.ts, through `can`),
 * so the table and this test cannot drift apart silently. The routes are also found by walking
 * the Express app: a route added without an entry here fails the test.
 *
 * Rules checked (server/permissions.ts): no session → 401; an address not yet verified → 403
 * email_unverified and a verified newcomer still waiting for approval → 403 no_organisation on
 * every route but health and /api/me; a role without the permission → 403 naming it; a record of
 * another organisation → 404 (never 403, so ids leak nothing); requests that name no record
 * answer the other organisation about its own data only.
 */
import { characterisationAnswerSchema } from '@/lib/schemas/characterisation-answer';
import { batchPhysicsAnswerSchema } from '@/lib/schemas/batch-physics-answer';
import { eq } from 'drizzle-orm';
import type { Express } from 'express';
import { batch, invitation, member, membershipRequest, organization, spec, user } from '@/db/schema';
import { seedDemoBatches } from '@/server/services/seed';
import { analyseFile } from '@/lib/analysis/analyse-file';
import type { FileAnalysis } from '@/lib/analysis/analyse-file';
import { can, ROLE_PERMISSIONS, ROLES } from '@/lib/auth/roles';
import type { Permission, Role } from '@/lib/auth/roles';
import { simulateCurve } from '@/lib/iv';
import { storeCurve } from '@/server/services/curves';
import { nonSnakeKeys } from '@/tests/support/json-keys';
import type { ZodType } from 'zod';
import {
  batchListSchema,
  batchSchema,
  comparisonWireSchema,
  curveDetailSchema,
  curvePageSchema,
  evaluationSchema,
  fitStatusSchema,
  meSchema,
  originalsCheckSchema,
  originalsDeletedSchema,
  outboxSchema,
  overlaySchema,
  refitAnswerSchema,
  reviewListSchema,
  setupListSchema,
  setupSchema,
  specJsonSchema,
  specListSchema,
  uploadAnswerSchema,
  userListSchema,
} from '@/lib/schemas/responses';
import { stationCreatedSchema, stationListSchema, stationSchema } from '@/lib/schemas/stations';
import { agentFor, signIn, signUp, startHarness } from '@/tests/server/harness';
import request from 'supertest';
import type { Harness } from '@/tests/server/harness';

type Agent = ReturnType<typeof agentFor>;
type Method = 'GET' | 'POST' | 'PATCH' | 'DELETE';
type Who = 'signed_out' | 'unverified' | 'awaiting' | Role | 'other_org';
const WHO: Who[] = ['signed_out', 'unverified', 'awaiting', ...ROLES, 'other_org'];

/** One request of a matrix cell; built fresh per cell so state-changing routes find the state they need. */
type Req = { url: string; body?: Record<string, unknown>; file?: { name: string; bytes: Buffer } };

type RouteCase = {
  method: Method;
  /** The route as Express knows it (mount path + router path). */
  path: string;
  /** 'public': no session; 'session': any member; else the permission from lib/auth/roles.ts. */
  need: 'public' | 'session' | Permission;
  /** Status of an allowed, valid request. */
  ok: 200 | 201;
  /**
   * A member of another organisation: 'not_found' when the request names one of our records
   * (404), 'own' when it names none and the route answers about their organisation (ok status,
   * nothing of ours in the body).
   */
  foreign: 'not_found' | 'own';
  build: () => Promise<Req>;
};

const ORG = 'matrix-pv.example';
const OTHER = 'other-org.example';

let h: Harness;
const agents = {} as Record<Role | 'unverified' | 'awaiting', Agent>;
const outsiders = {} as Record<'admin' | 'qa_lead', Agent>;
const ids = { batch: '', curve: '', spec: '', specFamily: '', setup: '', spareUser: '', org: '', engineer: '', released: '', release: '', archived: '', archivedCurve: '' };
/** Strings that must never appear in an answer to the other organisation. */
let ours: string[] = [];
let analysis: FileAnalysis;

async function setRole(email: string, role: Role) {
  const [u] = await h.database.db.select().from(user).where(eq(user.email, email));
  await h.database.db.update(member).set({ role }).where(eq(member.userId, u.id));
  return u.id;
}

/** A batch of our organisation in `state` with one fitted curve, stored the way an upload stores it. */
async function freshBatch(state: 'open' | 'in_review'): Promise<{ batchId: string; curveId: string }> {
  const batchId = crypto.randomUUID();
  await h.database.db.insert(batch).values({ id: batchId, organizationId: ids.org, name: `matrix ${state}`, cells: 1, state, createdBy: ids.engineer });
  const curveId = await storeCurve(h.database.db, { organizationId: ids.org, batchId, fileName: 'matrix.csv', analysis, userId: ids.engineer });
  ours.push(batchId, curveId);
  return { batchId, curveId };
}

/** A batch of ours with one curve uploaded through the API by the test engineer, so its original is kept in the archive. */
async function uploadedBatch(): Promise<{ batchId: string; curveId: string }> {
  const batchId = crypto.randomUUID();
  await h.database.db.insert(batch).values({ id: batchId, organizationId: ids.org, name: 'matrix archive', cells: 1, createdBy: ids.engineer });
  const res = await agents.test_engineer.post(`/api/batches/${batchId}/curves`).attach('files', cellCsv, 'matrix-original.csv');
  if (res.status !== 201) throw new Error(`matrix upload failed: ${res.status} ${res.text}`);
  const curveId = res.body.results[0].curve_id as string;
  ours.push(batchId, curveId);
  return { batchId, curveId };
}

/** A user of our organisation made straight in the database (verified), for routes that remove or answer one. */
async function freshUser(opts: { member: boolean }): Promise<string> {
  const id = crypto.randomUUID();
  await h.database.db.insert(user).values({ id, name: 'Matrix spare', email: `spare-${id}@${ORG}`, emailVerified: true });
  if (opts.member) await h.database.db.insert(member).values({ id: crypto.randomUUID(), organizationId: ids.org, userId: id, role: 'designer' });
  ours.push(id);
  return id;
}

/** A pending request to join our organisation. */
async function freshRequest(): Promise<string> {
  const id = crypto.randomUUID();
  await h.database.db.insert(membershipRequest).values({ id, organizationId: ids.org, userId: await freshUser({ member: false }) });
  ours.push(id);
  return id;
}

/** A pending invitation of our organisation. */
async function freshInvitation(): Promise<string> {
  const id = crypto.randomUUID();
  const [admin] = await h.database.db.select().from(user).where(eq(user.email, `admin@${ORG}`));
  await h.database.db.insert(invitation).values({ id, organizationId: ids.org, email: `invited-${id}@${ORG}`, role: 'designer', expiresAt: new Date(Date.now() + 86_400_000), inviterId: admin.id });
  ours.push(id);
  return id;
}

/** A station of ours made through the API by our administrator; its id (the key stays in `stationKey`). */
async function freshStation(): Promise<string> {
  const res = await agents.admin.post('/api/stations').send({ name: `Matrix line ${crypto.randomUUID().slice(0, 8)}` });
  if (res.status !== 201) throw new Error(`matrix station failed: ${res.status} ${res.text}`);
  ours.push(res.body.id);
  return res.body.id as string;
}

/** A batch of ours released by the QA lead through the API (so it has a release record), with its release's id. */
async function releasedBatch(): Promise<{ batchId: string; releaseId: string }> {
  const { batchId } = await freshBatch('in_review');
  const res = await agents.qa_lead.post(`/api/batches/${batchId}/decision`).send({ decision: 'release', spec_id: ids.spec, comment: 'matrix release' });
  if (res.status !== 200) throw new Error(`matrix release failed: ${res.status} ${res.text}`);
  const releaseId = (await agents.qa_lead.get(`/api/batches/${batchId}/reviews`)).body.releases[0].id as string;
  ours.push(releaseId);
  return { batchId, releaseId };
}

/** The newest version of our matrix spec, which a new version must name as its base. */
async function newestSpecVersion(): Promise<number> {
  const rows = await h.database.db.select({ v: spec.version }).from(spec).where(eq(spec.family_id, ids.specFamily));
  return Math.max(...rows.map((r) => r.v));
}

/** The benchmark cell simulated from its published optimum (tests/fixtures/reference-data/README.md), as a CSV file. */
const cellCsv = (() => {
  const c = simulateCurve({ iph_a: 0.760788, i0_a: 3.1068e-7, n: 1.47727, rs_ohm: 0.036547, rsh_ohm: 52.89 }, { cells: 1, temp_c: 33, points: 30 });
  return Buffer.from(['# cell temperature: 33', 'V,I', ...c.voltage_v.map((v, k) => `${v},${c.current_a[k]}`)].join('\n'));
})();

const ROUTES: RouteCase[] = [
  { method: 'GET', path: '/api/health', need: 'public', ok: 200, foreign: 'own', build: async () => ({ url: '/api/health' }) },
  { method: 'GET', path: '/api/me', need: 'session', ok: 200, foreign: 'own', build: async () => ({ url: '/api/me' }) },
  { method: 'GET', path: '/api/users', need: 'users:manage', ok: 200, foreign: 'own', build: async () => ({ url: '/api/users' }) },
  { method: 'PATCH', path: '/api/users/:id/role', need: 'users:manage', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/users/${ids.spareUser}/role`, body: { role: 'designer' } }) },
  { method: 'PATCH', path: '/api/users/:id/active', need: 'users:manage', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/users/${ids.spareUser}/active`, body: { active: true } }) },
  { method: 'DELETE', path: '/api/users/:id', need: 'users:manage', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/users/${await freshUser({ member: true })}` }) },
  { method: 'GET', path: '/api/invitations', need: 'users:manage', ok: 200, foreign: 'own', build: async () => ({ url: '/api/invitations' }) },
  // The other organisation's administrator invites to their own organisation.
  { method: 'POST', path: '/api/invitations', need: 'users:manage', ok: 201, foreign: 'own', build: async () => ({ url: '/api/invitations', body: { email: `invitee-${crypto.randomUUID()}@elsewhere.example`, role: 'designer' } }) },
  { method: 'DELETE', path: '/api/invitations/:id', need: 'users:manage', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/invitations/${await freshInvitation()}` }) },
  { method: 'GET', path: '/api/membership-requests', need: 'users:manage', ok: 200, foreign: 'own', build: async () => ({ url: '/api/membership-requests' }) },
  {
    method: 'POST',
    path: '/api/membership-requests/:id/decision',
    need: 'users:manage',
    ok: 200,
    foreign: 'not_found',
    build: async () => ({ url: `/api/membership-requests/${await freshRequest()}/decision`, body: { decision: 'approve', role: 'designer' } }),
  },
  { method: 'GET', path: '/api/organization', need: 'users:manage', ok: 200, foreign: 'own', build: async () => ({ url: '/api/organization' }) },
  { method: 'PATCH', path: '/api/organization', need: 'users:manage', ok: 200, foreign: 'own', build: async () => ({ url: '/api/organization', body: { join_by_domain: false } }) },
  { method: 'GET', path: '/api/organization/audit', need: 'users:manage', ok: 200, foreign: 'own', build: async () => ({ url: '/api/organization/audit' }) },
  { method: 'GET', path: '/api/outbox', need: 'outbox:read', ok: 200, foreign: 'own', build: async () => ({ url: '/api/outbox' }) },
  { method: 'GET', path: '/api/stations', need: 'station:manage', ok: 200, foreign: 'own', build: async () => ({ url: '/api/stations' }) },
  { method: 'POST', path: '/api/stations', need: 'station:manage', ok: 201, foreign: 'own', build: async () => ({ url: '/api/stations', body: { name: 'Matrix station' } }) },
  { method: 'DELETE', path: '/api/stations/:id', need: 'station:manage', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/stations/${await freshStation()}` }) },
  { method: 'GET', path: '/api/batches', need: 'batch:read', ok: 200, foreign: 'own', build: async () => ({ url: '/api/batches' }) },
  { method: 'POST', path: '/api/batches', need: 'batch:write', ok: 201, foreign: 'own', build: async () => ({ url: '/api/batches', body: { name: 'Matrix batch', cells: 1 } }) },
  { method: 'GET', path: '/api/batches/:id', need: 'batch:read', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/batches/${ids.batch}` }) },
  { method: 'PATCH', path: '/api/batches/:id', need: 'batch:write', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/batches/${(await freshBatch('open')).batchId}`, body: { description: 'matrix check' } }) },
  {
    method: 'POST',
    path: '/api/batches/:id/curves',
    need: 'batch:write',
    ok: 201,
    foreign: 'not_found',
    build: async () => ({ url: `/api/batches/${(await freshBatch('open')).batchId}/curves`, file: { name: 'matrix-upload.csv', bytes: cellCsv } }),
  },
  { method: 'GET', path: '/api/batches/:id/curves', need: 'batch:read', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/batches/${ids.batch}/curves` }) },
  { method: 'GET', path: '/api/batches/:id/fits', need: 'batch:read', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/batches/${ids.batch}/fits` }) },
  { method: 'POST', path: '/api/batches/:id/fits/cancel', need: 'batch:write', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/batches/${(await freshBatch('open')).batchId}/fits/cancel` }) },
  { method: 'GET', path: '/api/batches/:id/overlay', need: 'batch:read', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/batches/${ids.batch}/overlay` }) },
  { method: 'GET', path: '/api/batches/:id/characterisation', need: 'batch:read', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/batches/${ids.batch}/characterisation` }) },
  { method: 'GET', path: '/api/batches/:id/evaluation', need: 'batch:read', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/batches/${ids.batch}/evaluation?spec=${ids.spec}` }) },
  { method: 'GET', path: '/api/batches/:id/pass-fail.csv', need: 'batch:read', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/batches/${ids.batch}/pass-fail.csv?spec=${ids.spec}` }) },
  { method: 'GET', path: '/api/batches/:id/report.pdf', need: 'batch:read', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/batches/${ids.batch}/report.pdf?spec=${ids.spec}` }) },
  { method: 'GET', path: '/api/batches/:id/reviews', need: 'batch:read', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/batches/${ids.batch}/reviews` }) },
  { method: 'POST', path: '/api/batches/:id/submit', need: 'batch:submit', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/batches/${(await freshBatch('open')).batchId}/submit`, body: { comment: 'matrix' } }) },
  {
    method: 'POST',
    path: '/api/batches/:id/decision',
    need: 'release:decide',
    ok: 200,
    foreign: 'not_found',
    build: async () => ({ url: `/api/batches/${(await freshBatch('in_review')).batchId}/decision`, body: { decision: 'hold', spec_id: ids.spec, comment: 'matrix check' } }),
  },
  { method: 'GET', path: '/api/batches/:id/releases/:releaseId', need: 'batch:read', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/batches/${ids.released}/releases/${ids.release}` }) },
  { method: 'GET', path: '/api/batches/:id/releases/:releaseId/pass-fail.csv', need: 'batch:read', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/batches/${ids.released}/releases/${ids.release}/pass-fail.csv` }) },
  { method: 'POST', path: '/api/batches/:id/reopen', need: 'release:decide', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/batches/${(await releasedBatch()).batchId}/reopen`, body: { reason: 'matrix check' } }) },
  { method: 'GET', path: '/api/specs', need: 'spec:read', ok: 200, foreign: 'own', build: async () => ({ url: '/api/specs' }) },
  { method: 'GET', path: '/api/specs/:id', need: 'spec:read', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/specs/${ids.spec}` }) },
  // A new version of our spec (family_id): the other organisation's QA lead must get 404, not a version of it.
  {
    method: 'POST',
    path: '/api/specs',
    need: 'spec:write',
    ok: 201,
    foreign: 'not_found',
    build: async () => ({ url: '/api/specs', body: { name: 'Matrix spec', limits: { pmp_w: { min: 0 } }, family_id: ids.specFamily, base_version: await newestSpecVersion() } }),
  },
  // Measurement setups (server/routes/setups.ts): everyone reads, QA leads write; the other organisation's QA lead makes setups of their own.
  { method: 'GET', path: '/api/setups', need: 'spec:read', ok: 200, foreign: 'own', build: async () => ({ url: '/api/setups' }) },
  { method: 'GET', path: '/api/setups/:id', need: 'spec:read', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/setups/${ids.setup}` }) },
  {
    method: 'POST',
    path: '/api/setups',
    need: 'spec:write',
    ok: 201,
    foreign: 'own',
    build: async () => ({ url: '/api/setups', body: { name: 'Matrix setup', components: [{ name: 'Tester', acts_on: 'pmp', value: 1, unit: '%', distribution: 'normal', k: 2 }] } }),
  },
  { method: 'PATCH', path: '/api/setups/:id', need: 'spec:write', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/setups/${ids.setup}`, body: { name: 'Matrix line tester' } }) },
  { method: 'GET', path: '/api/compare', need: 'batch:read', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/compare?batches=${ids.batch}&param=pmp_w` }) },
  { method: 'GET', path: '/api/compare/comparison.csv', need: 'batch:read', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/compare/comparison.csv?batches=${ids.batch}&param=pmp_w&spec=${ids.spec}` }) },
  { method: 'GET', path: '/api/curves/:id', need: 'batch:read', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/curves/${ids.curve}` }) },
  { method: 'POST', path: '/api/curves/:id/refit', need: 'batch:write', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/curves/${(await freshBatch('open')).curveId}/refit`, body: { model: 'single' } }) },
  { method: 'GET', path: '/api/curves/:id/original', need: 'batch:read', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/curves/${ids.archivedCurve}/original` }) },
  { method: 'POST', path: '/api/curves/:id/reanalyse', need: 'batch:write', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/curves/${(await uploadedBatch()).curveId}/reanalyse`, body: {} }) },
  { method: 'GET', path: '/api/batches/:id/originals.zip', need: 'batch:read', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/batches/${ids.archived}/originals.zip` }) },
  { method: 'POST', path: '/api/batches/:id/originals/verify', need: 'archive:manage', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/batches/${ids.archived}/originals/verify` }) },
  { method: 'DELETE', path: '/api/batches/:id/originals', need: 'archive:manage', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/batches/${(await uploadedBatch()).batchId}/originals` }) },
  { method: 'GET', path: '/api/physics/material', need: 'physics:use', ok: 200, foreign: 'own', build: async () => ({ url: '/api/physics/material?temp_k=300' }) },
  { method: 'POST', path: '/api/physics/band-diagram', need: 'physics:use', ok: 200, foreign: 'own', build: async () => ({ url: '/api/physics/band-diagram', body: { type: 'p', doping_cm3: 1e16, excess_cm3: 1e14, temp_k: 300 } }) },
  { method: 'GET', path: '/api/physics/curves/:id', need: 'physics:use', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/physics/curves/${ids.curve}` }) },
  {
    method: 'POST',
    path: '/api/physics/curves/:id/translate',
    need: 'physics:use',
    ok: 200,
    foreign: 'not_found',
    build: async () => ({ url: `/api/physics/curves/${ids.curve}/translate`, body: { method: 'model', to: { irradiance_w_m2: 1000, temp_c: 25 } } }),
  },
  { method: 'GET', path: '/api/physics/batches/:id', need: 'physics:use', ok: 200, foreign: 'not_found', build: async () => ({ url: `/api/physics/batches/${ids.batch}` }) },
  { method: 'POST', path: '/api/strings/size', need: 'physics:use', ok: 200, foreign: 'not_found', build: async () => ({ url: '/api/strings/size', body: { batch_id: ids.batch, t_min_c: -10, v_sys_v: 1000 } }) },
];

/** The status a cell must answer, from the route's entry and the role table. */
function expectedStatus(route: RouteCase, who: Who): number {
  if (route.need === 'public') return route.ok;
  if (who === 'signed_out') return 401;
  if (who === 'unverified' || who === 'awaiting') return route.need === 'session' ? route.ok : 403;
  if (who === 'other_org') return route.foreign === 'not_found' ? 404 : route.ok;
  if (route.need === 'session') return route.ok;
  return can(who, route.need) ? route.ok : 403;
}

/** The other organisation's member who holds the route's permission (QA lead, else admin). */
function outsiderFor(route: RouteCase): Agent {
  if (route.need === 'public' || route.need === 'session' || can('qa_lead', route.need)) return outsiders.qa_lead;
  if (can('admin', route.need)) return outsiders.admin;
  throw new Error(`no role holds ${route.need}`);
}

async function send(agent: Agent, method: Method, req: Req) {
  const m = method === 'GET' ? agent.get(req.url) : method === 'POST' ? agent.post(req.url) : method === 'PATCH' ? agent.patch(req.url) : agent.delete(req.url);
  if (req.file) return m.attach('files', req.file.bytes, req.file.name);
  return req.body ? m.send(req.body) : m;
}

type Layer = { rawPath?: unknown; route?: { path: string; methods: Record<string, boolean> }; handle?: { stack?: Layer[] } };

/** Method + path of every route the app registers, walking nested routers (Express 5 / router 2). */
function walkRoutes(app: Express): string[] {
  const found: string[] = [];
  const visit = (stack: Layer[], prefix: string) => {
    for (const layer of stack) {
      const here = typeof layer.rawPath === 'string' && layer.rawPath !== '/' ? layer.rawPath : '';
      if (layer.route) {
        const full = (prefix + layer.route.path).replace(/(.)\/$/, '$1');
        for (const m of Object.keys(layer.route.methods)) found.push(`${m.toUpperCase()} ${full}`);
      } else if (layer.handle?.stack) {
        visit(layer.handle.stack, prefix + here);
      }
    }
  };
  visit((app as unknown as { router: { stack: Layer[] } }).router.stack, '');
  return found;
}

beforeAll(async () => {
  h = await startHarness();
  agents.admin = await signUp(h.app, { email: `admin@${ORG}` });
  agents.test_engineer = await signUp(h.app, { email: `tester@${ORG}` });
  agents.designer = await signUp(h.app, { email: `designer@${ORG}` });
  agents.qa_lead = await signUp(h.app, { email: `qa@${ORG}` });
  await signUp(h.app, { email: `spare@${ORG}` });
  await setRole(`designer@${ORG}`, 'designer');
  await setRole(`qa@${ORG}`, 'qa_lead');
  ids.spareUser = await setRole(`spare@${ORG}`, 'designer');
  ids.engineer = (await h.database.db.select().from(user).where(eq(user.email, `tester@${ORG}`)))[0].id;
  outsiders.admin = await signUp(h.app, { email: `admin@${OTHER}` });
  outsiders.qa_lead = await signUp(h.app, { email: `qa@${OTHER}` });
  await setRole(`qa@${OTHER}`, 'qa_lead');
  // Signed in with an address not yet verified, and verified but waiting for an administrator.
  expect((await agentFor(h.app).post('/api/auth/sign-up/email').send({ email: `unverified@${ORG}`, password: 'correct-horse-9', name: 'Unverified' })).status).toBe(200);
  agents.unverified = await signIn(h.app, `unverified@${ORG}`, 'correct-horse-9');
  agents.awaiting = await signUp(h.app, { email: `awaiting@${ORG}` }, { approve: false });

  const [org] = await h.database.db.select().from(organization).where(eq(organization.domain, ORG));
  ids.org = org.id;
  await seedDemoBatches(h.database.db, org.id, ids.engineer);
  const batches = await h.database.db.select().from(batch).where(eq(batch.organizationId, org.id));
  // The demo module batch of line 3 (sample-data/batches/manifest.json): fitted 60-cell modules.
  ids.batch = batches.find((b) => b.lot === 'M2612')!.id;
  const list = await agents.designer.get(`/api/batches/${ids.batch}/curves?page_size=1`);
  ids.curve = list.body.curves[0].id;
  const spec = await agents.qa_lead.post('/api/specs').send({ name: 'Matrix base spec', limits: { pmp_w: { min: 0 } } });
  expect(spec.status).toBe(201);
  ids.spec = spec.body.id;
  ids.specFamily = spec.body.family_id;
  const setup = await agents.qa_lead.post('/api/setups').send({ name: 'Matrix line tester', components: [{ name: 'Reference cell', acts_on: 'irradiance', value: 1.6, unit: '%', distribution: 'normal', k: 2 }] });
  expect(setup.status).toBe(201);
  ids.setup = setup.body.id;
  analysis = analyseFile(cellCsv, { fileName: 'matrix.csv' });
  ours = [ORG, org.id, ids.spareUser, ids.spec, ids.specFamily, ids.setup, ids.curve, ...batches.map((b) => b.id)];
  const archived = await uploadedBatch();
  ids.archived = archived.batchId;
  ids.archivedCurve = archived.curveId;
  const released = await releasedBatch();
  ids.released = released.batchId;
  ids.release = released.releaseId;
}, 240_000); // seven sign-ups with verification, the demo batches and a release, on a shared machine
afterAll(async () => {
  await h.close();
});

describe('the route list', () => {
  it('names every API route the app registers, and no route that does not exist', () => {
    const walked = walkRoutes(h.app).filter((r) => r.split(' ')[1].startsWith('/api/'));
    // better-auth's handler is one mount for every method; its endpoints are checked below.
    const auth = walked.filter((r) => r.endsWith(' /api/auth/{*splat}'));
    expect(auth).toContain('POST /api/auth/{*splat}');
    const api = [...new Set(walked.filter((r) => !r.endsWith(' /api/auth/{*splat}')))].sort();
    expect(api).toEqual(ROUTES.map((r) => `${r.method} ${r.path}`).sort());
  });

  it('every permission a role holds guards at least one route', () => {
    const used = new Set(ROUTES.map((r) => r.need));
    const all = new Set(Object.values(ROLE_PERMISSIONS).flat());
    for (const p of all) expect(used.has(p)).toBe(true);
  });
});

const cells = ROUTES.flatMap((route) => WHO.map((who) => [`${route.method} ${route.path}`, who, expectedStatus(route, who), route] as const));

describe('every route × every kind of caller', () => {
  it.each(cells)('%s as %s → %i', async (_name, who, status, route) => {
    const req = await route.build();
    const agent = who === 'signed_out' ? agentFor(h.app) : who === 'other_org' ? outsiderFor(route) : agents[who];
    const res = await send(agent, route.method, req);
    expect(res.status).toBe(status);
    if (status === 401) expect(res.body.code).toBe('unauthenticated');
    if (status === 403 && who === 'unverified') expect(res.body.code).toBe('email_unverified');
    else if (status === 403 && who === 'awaiting') expect(res.body.code).toBe('no_organisation');
    else if (status === 403) expect(res.body).toEqual({ code: 'forbidden', message: expect.stringContaining(String(route.need)) });
    if (status === 404) expect(res.body.code).toBe('not_found');
    if (who === 'other_org') for (const s of ours) expect(res.text).not.toContain(s);
    // Their own address and the organisation's name (its domain) may appear; none of our records' ids.
    if (who === 'unverified' || who === 'awaiting') for (const s of ours.filter((x) => x !== ORG)) expect(res.text).not.toContain(s);
  });
});

/** The caller who may use the route: the QA lead, else the admin. */
function allowedAgent(route: RouteCase): Agent {
  if (route.need === 'public' || route.need === 'session' || can('qa_lead', route.need)) return agents.qa_lead;
  return agents.admin;
}

describe('one vocabulary: every key of every JSON answer is snake_case', () => {
  // Files: CSV exports, the report PDF, the originals as uploaded and their zip.
  const json = ROUTES.filter((r) => !r.path.endsWith('.csv') && !r.path.endsWith('.pdf') && !r.path.endsWith('.zip') && !r.path.endsWith('/original'));
  it.each(json.map((r) => [`${r.method} ${r.path}`, r] as const))('%s', async (_name, route) => {
    const res = await send(allowedAgent(route), route.method, await route.build());
    expect(res.status).toBe(route.ok);
    expect(res.type).toBe('application/json');
    expect(nonSnakeKeys(res.body)).toEqual([]);
  });

  it('the walk finds a camelCase key, also deep in arrays, and skips only data maps', () => {
    // The test can fail: a made-up answer with one wrong key at each depth.
    // (Made-up names that no renaming touches, so the check stays a check.)
    const answer = { batches: [{ id: 'x', curvesTotal: 2, power_class_counts: { P400: 1 } }], meta: { cellTemp_C: 25 } };
    expect(nonSnakeKeys(answer)).toEqual(['$.batches[0].curvesTotal', '$.meta.cellTemp_C']);
  });
});

/** The response schema of each route (lib/schemas/responses.ts); the client's types are inferred from them. */
const RESPONSE_SCHEMAS: Record<string, ZodType> = {
  'GET /api/me': meSchema,
  'GET /api/users': userListSchema,
  'GET /api/outbox': outboxSchema,
  'GET /api/batches': batchListSchema,
  'POST /api/batches': batchSchema,
  'GET /api/batches/:id': batchSchema,
  'PATCH /api/batches/:id': batchSchema,
  'POST /api/batches/:id/curves': uploadAnswerSchema,
  'GET /api/batches/:id/curves': curvePageSchema,
  'GET /api/batches/:id/fits': fitStatusSchema,
  'POST /api/batches/:id/fits/cancel': fitStatusSchema,
  'GET /api/batches/:id/overlay': overlaySchema,
  'GET /api/batches/:id/characterisation': characterisationAnswerSchema,
  'GET /api/physics/batches/:id': batchPhysicsAnswerSchema,
  'GET /api/batches/:id/evaluation': evaluationSchema,
  'GET /api/batches/:id/reviews': reviewListSchema,
  'GET /api/specs': specListSchema,
  'GET /api/specs/:id': specJsonSchema,
  'POST /api/specs': specJsonSchema,
  'GET /api/compare': comparisonWireSchema,
  'GET /api/setups': setupListSchema,
  'GET /api/setups/:id': setupSchema,
  'POST /api/setups': setupSchema,
  'PATCH /api/setups/:id': setupSchema,
  'GET /api/curves/:id': curveDetailSchema,
  'GET /api/stations': stationListSchema,
  'POST /api/stations': stationCreatedSchema,
  'DELETE /api/stations/:id': stationSchema,
  'POST /api/curves/:id/refit': refitAnswerSchema,
  'POST /api/curves/:id/reanalyse': curveDetailSchema,
  'POST /api/batches/:id/originals/verify': originalsCheckSchema,
  'DELETE /api/batches/:id/originals': originalsDeletedSchema,
};

describe('the answers match the response schemas the client is typed with (strict objects)', () => {
  it.each(Object.entries(RESPONSE_SCHEMAS))('%s', async (name, schema) => {
    const route = ROUTES.find((r) => `${r.method} ${r.path}` === name)!;
    const res = await send(allowedAgent(route), route.method, await route.build());
    expect(res.status).toBe(route.ok);
    const parsed = schema.safeParse(res.body);
    expect(parsed.success ? [] : parsed.error.issues.slice(0, 5)).toEqual([]);
  });

  it('a strict schema refuses a key it does not name (the test can fail)', () => {
    expect(batchListSchema.safeParse({ batches: [{ id: 'x', createdAt: 'then' }] }).success).toBe(false);
  });
});

/**
 * Station keys (x-api-key, server/station-keys.ts): a key of our organisation may create a batch
 * and upload curves into our batches, as the station; every other route answers 403; a batch of
 * another organisation is 404; a wrong or revoked key is 401 with words, on any route.
 */
describe('station keys × every route', () => {
  const STATION_MAY = new Set(['POST /api/batches', 'POST /api/batches/:id/curves']);
  let key = '';
  let otherKey = '';
  let revokedKey = '';
  beforeAll(async () => {
    key = (await agents.admin.post('/api/stations').send({ name: 'Matrix key line' })).body.key;
    otherKey = (await outsiders.admin.post('/api/stations').send({ name: 'Other line' })).body.key;
    const revoked = await agents.admin.post('/api/stations').send({ name: 'Matrix revoked line' });
    revokedKey = revoked.body.key;
    expect((await agents.admin.delete(`/api/stations/${revoked.body.id}`)).status).toBe(200);
  });
  /** A request as a command-line client sends it: no cookie, no Origin, the key in x-api-key. */
  const asStation = (k: string, route: RouteCase, req: Req) => {
    const agent = request(h.app);
    const url = req.url;
    const m = route.method === 'GET' ? agent.get(url) : route.method === 'POST' ? agent.post(url) : route.method === 'PATCH' ? agent.patch(url) : agent.delete(url);
    m.set('x-api-key', k);
    if (req.file) return m.attach('files', req.file.bytes, req.file.name);
    return req.body ? m.send(req.body) : m;
  };

  it.each(ROUTES.map((r) => [`${r.method} ${r.path}`, r] as const))('%s with our key', async (name, route) => {
    const res = await asStation(key, route, await route.build());
    if (STATION_MAY.has(name)) {
      expect(res.status).toBe(route.ok);
      if (name === 'POST /api/batches') expect(batchSchema.safeParse(res.body).success).toBe(true);
      else expect(uploadAnswerSchema.safeParse(res.body).success).toBe(true);
    } else {
      expect(res.status).toBe(403);
      expect(res.body).toEqual({ code: 'station_forbidden', message: expect.stringContaining('may only create batches and upload curves') });
    }
  });

  it.each(ROUTES.map((r) => [`${r.method} ${r.path}`, r] as const))('%s with another organisation’s key', async (name, route) => {
    const res = await asStation(otherKey, route, await route.build());
    if (name === 'POST /api/batches') {
      // A batch of its own organisation: nothing of ours in the answer.
      expect(res.status).toBe(201);
      for (const s of ours) expect(res.text).not.toContain(s);
    } else expect(res.status).toBe(STATION_MAY.has(name) ? 404 : 403);
  });

  it.each([
    ['a wrong key', () => 'qls_' + 'x'.repeat(64), 'not valid'],
    ['a revoked key', () => revokedKey, 'revoked'],
  ])('%s → 401 with words, on every route', async (_label, k, words) => {
    for (const route of [ROUTES.find((r) => r.path === '/api/batches/:id/curves')!, ROUTES.find((r) => r.path === '/api/users')!]) {
      const res = await asStation(k(), route, await route.build());
      expect(res.status).toBe(401);
      expect(res.body).toEqual({ code: 'invalid_key', message: expect.stringContaining(words) });
    }
  });

  it('better-auth’s own api-key endpoints are closed; the key cannot reach /api/auth either', async () => {
    expect((await agents.admin.post('/api/auth/api-key/create').send({ name: 'sneaky' })).status).toBe(403);
    expect((await agents.admin.get('/api/auth/api-key/list')).status).toBe(403);
    expect((await request(h.app).get('/api/auth/get-session').set('x-api-key', key)).status).toBe(403);
  });

  it('curves a station sends are recorded as the station’s, and its last use is shown', async () => {
    const created = await request(h.app).post('/api/batches').set('x-api-key', key).send({ name: 'Station batch', cells: 1 });
    expect(created.status).toBe(201);
    const up = await request(h.app).post(`/api/batches/${created.body.id}/curves`).set('x-api-key', key).attach('files', cellCsv, 'station-1.csv');
    expect(up.status).toBe(201);
    const [row] = await h.database.db.select({ name: user.name }).from(batch).innerJoin(user, eq(user.id, batch.createdBy)).where(eq(batch.id, created.body.id));
    expect(row.name).toBe('Matrix key line');
    const list = (await agents.admin.get('/api/stations')).body.stations as { name: string; last_used_at: string | null; revoked: boolean }[];
    const line = list.find((s) => s.name === 'Matrix key line')!;
    expect(line.revoked).toBe(false);
    expect(Date.now() - Date.parse(line.last_used_at!)).toBeLessThan(60_000);
    expect(list.find((s) => s.name === 'Matrix revoked line')!.revoked).toBe(true);
    // The station is not a member: the users list does not show it.
    expect(JSON.stringify((await agents.admin.get('/api/users')).body)).not.toContain('Matrix key line');
  });
});
