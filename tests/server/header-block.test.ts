/**
 * A tester's export with a header block, uploaded through the API (issue 14, items 2 and 3): the
 * known keys fill the curve's figures, the unknown ones come back in `meta.extra`, an irradiance
 * column sets the measurement irradiance with its spread and flag, and a file without a table is
 * refused with the line named. The files are the invented examples of tests/fixtures/header-block
 * (their README); expected figures are computed here from the files' text.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { curveDetailSchema, uploadAnswerSchema } from '@/lib/schemas/responses';
import { signUp, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';

const FIXTURES = path.resolve(__dirname, '../fixtures/header-block');
const commaBlock = readFileSync(path.join(FIXTURES, 'comma-block.csv'));
const drift = readFileSync(path.join(FIXTURES, 'irradiance-column-drift.csv'));

/** Mean and (max − min)/mean of the drift file's third column (kW/m² → W/m²). */
function driftStats() {
  const lines = drift.toString('utf8').trim().split('\n');
  const start = lines.findIndex((l) => l.startsWith('Voltage')) + 1;
  const g = lines.slice(start).map((l) => Number(l.split(',')[2]) * 1000);
  const mean = g.reduce((s, x) => s + x, 0) / g.length;
  return { mean, spread_pct: ((Math.max(...g) - Math.min(...g)) / mean) * 100 };
}

let h: Harness;
let tester: Awaited<ReturnType<typeof signUp>>;
let batchId: string;
let results: { file: string; accepted: boolean; curve_id?: string; error?: string; code?: string; line?: number }[];

beforeAll(async () => {
  h = await startHarness();
  await signUp(h.app, { email: 'admin@lambda-pv.example' });
  tester = await signUp(h.app, { email: 'tester@lambda-pv.example' });
  const b = await tester.post('/api/batches').send({ name: 'Header blocks', cells: 60 });
  expect(b.status).toBe(201);
  batchId = b.body.id;
  const res = await tester
    .post(`/api/batches/${batchId}/curves`)
    .attach('files', commaBlock, 'comma-block.csv')
    .attach('files', drift, 'irradiance-column-drift.csv')
    .attach('files', Buffer.from('Module ID,KX-1\nIrradiance,1000\n\nOperator,J. Doe\n'), 'no-table.csv');
  expect(res.status).toBe(201);
  expect(uploadAnswerSchema.safeParse(res.body).success).toBe(true);
  results = res.body.results;
});
afterAll(async () => {
  await h.close();
});

describe('upload of header-block files', () => {
  it('the comma block: known keys fill meta (the file’s 36 cells win over the batch’s 60), unknown keys come back in meta.extra', async () => {
    expect(results[0]).toEqual(expect.objectContaining({ accepted: true, device_id: 'HB-0001' }));
    const res = await tester.get(`/api/curves/${results[0].curve_id}`);
    expect(res.status).toBe(200);
    const parsed = curveDetailSchema.safeParse(res.body);
    expect(parsed.success ? [] : parsed.error.issues).toEqual([]);
    const c = res.body;
    expect(c.device_id).toBe('HB-0001');
    expect(c.meta).toEqual({
      device_id: 'HB-0001',
      irradiance_w_m2: 1000,
      temp_c: 45,
      cells: 36,
      area_cm2: 3180, // 0.318 m²
      measured_at: '2024-05-01T10:15:00',
      extra: [
        { key: 'Title', value: 'Flash test report' },
        { key: 'Module type', value: 'HB-36P' },
        { key: 'Operator', value: 'Doe, J.' },
        { key: 'Lamp hours', value: '1203 h' },
      ],
    });
    expect(c.flags.map((f: { code: string }) => f.code)).not.toContain('irradiance-unsteady');
    // η = Pmp / (G·A) with the file's 1000 W/m² and 0.318 m².
    expect(c.metrics.efficiency).toBeCloseTo(c.metrics.pmp_w / (1000 * 0.318), 12);
  });

  it('the irradiance column: the mean over the sweep, its spread, the flag in words and the note that the column won', async () => {
    const expected = driftStats();
    const c = (await tester.get(`/api/curves/${results[1].curve_id}`)).body;
    expect(c.meta.irradiance_w_m2).toBeCloseTo(expected.mean, 9);
    expect(c.meta.irradiance_spread_pct).toBeCloseTo(expected.spread_pct, 9);
    const flag = c.flags.find((f: { code: string }) => f.code === 'irradiance-unsteady');
    expect(flag).toEqual(expect.objectContaining({ severity: 'warn', message: expect.stringMatching(/The irradiance changed by 3\.5 % of its mean/) }));
    expect(c.notes.join(' ')).toMatch(/irradiance column .* is used instead of the 1000 W\/m² on line 3/);
    // The STC translation starts from the column's mean.
    expect(c.stc.from.irradiance_w_m2).toBeCloseTo(expected.mean, 9);
  });

  it('a file without a table is refused naming the last line read', () => {
    expect(results[2]).toEqual(expect.objectContaining({ accepted: false, code: 'no-header', line: 4 }));
    expect(results[2].error).toMatch(/line 4: no header row naming a voltage and a current column/);
  });

  it('the batch counts the flag', async () => {
    const b = (await tester.get(`/api/batches/${batchId}`)).body;
    expect(b.flag_counts?.['irradiance-unsteady']).toBe(1);
  });
});
