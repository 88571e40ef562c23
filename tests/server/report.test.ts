/**
 * The release report (GET /api/batches/:id/report.pdf) read back with pdf-parse: the device
 * table, the counts, the spec with its limits, the sign-off and the high-voltage caution; a
 * released batch's report comes from its release record; the release mail carries it and links
 * to the batch. Curves: the benchmark cell simulated from its published optimum
 * (tests/fixtures/reference-data/README.md); the high-Rs device and the lot names are invented.
 */
import { eq } from 'drizzle-orm';
import { member, user } from '@/db/schema';
import { simulateCurve } from '@/lib/iv';
import { HV_CAUTION } from '@/lib/strings/cautions';
import { BASE_URL, lastMail, signIn, signUp, startHarness } from '@/tests/server/harness';
import { pdfText } from '@/tests/support/pdf-text';
import type { Harness } from '@/tests/server/harness';

type Agent = Awaited<ReturnType<typeof signUp>>;
const ORG = 'report-pv.example';

function cellFile(device: string, scale: number, rs_ohm = 0.036547): Buffer {
  const c = simulateCurve({ iph_a: 0.760788 * scale, i0_a: 3.1068e-7, n: 1.47727, rs_ohm, rsh_ohm: 52.89 }, { cells: 1, temp_c: 33, points: 30 });
  return Buffer.from([`# device: ${device}`, '# cell temperature: 33', 'V,I', ...c.voltage_v.map((v, k) => `${v},${c.current_a[k]}`)].join('\n'));
}

let h: Harness;
let tester: Agent, qa: Agent;
let strict = '';

/** A binary answer collected whole (supertest leaves application/pdf unparsed otherwise). */
async function pdfOf(agent: Agent, url: string): Promise<{ status: number; type: string; disposition: string; text: string }> {
  const res = await agent
    .get(url)
    .buffer(true)
    .parse((r, cb) => {
      const parts: Buffer[] = [];
      r.on('data', (c: Buffer) => parts.push(c));
      r.on('end', () => cb(null, Buffer.concat(parts)));
    });
  if (res.status !== 200) return { status: res.status, type: res.type, disposition: '', text: '' };
  const parsed = pdfText(res.body as Buffer);
  return { status: res.status, type: res.type, disposition: String(res.headers['content-disposition']), text: parsed.text };
}

/** Text with the PDF's line breaks and spacing folded, so a sentence wrapped in the caution box still matches. */
const fold = (s: string) => s.replace(/\s+/g, ' ');

async function makeBatch(name: string) {
  const b = (await tester.post('/api/batches').send({ name, cells: 1, lot: `${name}-lot` })).body;
  const up = await tester
    .post(`/api/batches/${b.id}/curves`)
    .attach('files', cellFile(`${name}-1`, 1), 'c1.csv')
    .attach('files', cellFile(`${name}-2`, 1.01), 'c2.csv')
    .attach('files', cellFile(`${name}-3`, 0.99, 0.3), 'c3.csv');
  expect(up.status).toBe(201);
  return b.id as string;
}

beforeAll(async () => {
  h = await startHarness();
  await signUp(h.app, { email: `admin@${ORG}` });
  tester = await signUp(h.app, { email: `tester@${ORG}`, name: 'Tess Tester' });
  await signUp(h.app, { email: `qa@${ORG}`, name: 'Quentin QA' });
  const [u] = await h.database.db.select().from(user).where(eq(user.email, `qa@${ORG}`));
  await h.database.db.update(member).set({ role: 'qa_lead' }).where(eq(member.userId, u.id));
  qa = await signIn(h.app, `qa@${ORG}`, 'correct-horse-9');
  strict = (await qa.post('/api/specs').send({ name: 'Strict cells', limits: { rs_ohm: { max: 0.1 }, ff: { min: 0.6 } } })).body.id;
}, 120_000);
afterAll(async () => {
  await h.close();
});

describe('the release report', () => {
  it('of a batch not released: judged now against ?spec, said so; device table, counts, limits, caution', async () => {
    const id = await makeBatch('Open lot');
    const pdf = await pdfOf(tester, `/api/batches/${id}/report.pdf?spec=${strict}`);
    expect(pdf.status).toBe(200);
    expect(pdf.type).toBe('application/pdf');
    expect(pdf.disposition).toMatch(/attachment; filename="Open_lot-report-v1.pdf"/);
    const t = fold(pdf.text);
    expect(t).toContain('Release report: Open lot');
    expect(t).toMatch(/Not released: the batch is open/);
    expect(t).toContain('Acceptance spec: Strict cells, version 1');
    expect(t).toMatch(/FF at least 60\.0 %/);
    expect(t).toMatch(/Rs at most 0\.1/);
    // Counts: two pass, the high-Rs cell fails.
    expect(t).toMatch(/Devices 3/);
    expect(t).toMatch(/Pass 2/);
    expect(t).toMatch(/Fail 1/);
    // The device table: every device, its result, the failing one with its reason.
    for (const d of ['Open lot-1', 'Open lot-2']) expect(t).toMatch(new RegExp(`${d} pass`));
    expect(t).toMatch(/Open lot-3 FAIL .*FF 46\.\d % is below the minimum 60\.0 % \(simple rule\); Rs 0\.3\d* Ω is above the maximum 0\.1\d* Ω/);
    expect(t).toContain(fold(HV_CAUTION.title));
    for (const b of HV_CAUTION.bullets) expect(t).toContain(fold(b));
  }, 60_000);

  it('says what each power class means beside the class counts', async () => {
    const id = await makeBatch('Classed lot');
    const classed = (await qa.post('/api/specs').send({ name: 'Classed cells', power_classes: { step_w: 0.5, lowest_w: 0.5 } })).body.id;
    const t = fold((await pdfOf(tester, `/api/batches/${id}/report.pdf?spec=${classed}`)).text);
    expect(t).toContain('Power classes');
    expect(t).toContain('a device is in class PN when N ≤ Pmax < N + 0.5 W');
    expect(t).toContain('The lowest class is P0.5; a device below it has no class and fails.');
  }, 60_000);

  it('without ?spec and no decision yet: 400 asking for a spec', async () => {
    const id = await makeBatch('No spec');
    const res = await tester.get(`/api/batches/${id}/report.pdf`);
    expect(res.status).toBe(400);
    expect(res.body.code).toBe('spec_required');
  }, 60_000);

  it('of a released batch: from the release record, with who submitted and released; attached to the release mail, which links to the batch', async () => {
    const id = await makeBatch('Shipped');
    expect((await tester.post(`/api/batches/${id}/submit`).send({})).status).toBe(200);
    const release = await qa.post(`/api/batches/${id}/decision`).send({ decision: 'release', spec_id: strict, comment: 'High-Rs cell goes to rework.' });
    expect(release.status).toBe(200);
    const pdf = await pdfOf(tester, `/api/batches/${id}/report.pdf`);
    expect(pdf.status).toBe(200);
    const t = fold(pdf.text);
    expect(t).toMatch(/Released, revision 1\. Built from the frozen release record\./);
    expect(t).toMatch(/Submitted by Tess Tester, \d{4}-\d\d-\d\d \d\d:\d\d UTC/);
    expect(t).toMatch(/Released by Quentin QA, \d{4}-\d\d-\d\d \d\d:\d\d UTC/);
    expect(t).toContain('High-Rs cell goes to rework.');
    expect(t).toMatch(/Shipped-3 FAIL/);
    expect(t).toMatch(/Fail 1/);
    const decision = await lastMail(h.app, `tester@${ORG}`, 'release-decision');
    expect(decision?.body).toContain(`${BASE_URL}/batches/${id}`);
    expect(decision?.body).toContain('The release report (PDF) is attached: Shipped-report-v1.pdf.');
    // The .eml carries the PDF.
    const eml = h.mails().find((m) => m.includes('release-decision') || m.includes('Shipped-report-v1.pdf'));
    expect(eml).toMatch(/Content-Type: application\/pdf; name=Shipped-report-v1\.pdf/);
    expect(eml).toMatch(/Content-Disposition: attachment; filename=Shipped-report-v1\.pdf/);
    // The review request mail links to its batch too.
    expect((await lastMail(h.app, `qa@${ORG}`, 'review-request'))?.body).toContain(`${BASE_URL}/batches/${id}`);
  }, 60_000);
});
