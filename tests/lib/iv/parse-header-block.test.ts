/**
 * The reader finds the table behind a header block (issue 14, item 3) and reads an irradiance
 * column (item 2). The files in tests/fixtures/header-block are invented header blocks in front of
 * the measured points of the 36-cell module of Easwarakhanthan et al. (1986)
 * (tests/fixtures/reference-data/module-36cell-45C.csv); the inline texts below are invented too.
 * Expected figures are computed here from the files' own text, not copied from the reader.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { analyseCurve } from '@/lib/iv/analyse';
import { IvInputError } from '@/lib/iv/errors';
import { IRRADIANCE_SPREAD_LIMIT_PCT } from '@/lib/iv/meta-flags';
import { parseIvText } from '@/lib/iv/parse';
import { MAX_EXTRA } from '@/lib/iv/parse-meta';

const FIXTURES = path.resolve(__dirname, '../../fixtures/header-block');
const REF = path.resolve(__dirname, '../../fixtures/reference-data/module-36cell-45C.csv');
const fixture = (name: string) => readFileSync(path.join(FIXTURES, name), 'utf8');

/** The reference points, read by hand: "V,I" then one pair a line. */
const refPoints = readFileSync(REF, 'utf8')
  .trim()
  .split('\n')
  .slice(1)
  .map((l) => l.split(',').map(Number));
const table = ['V,I', ...refPoints.map(([v, i]) => `${v},${i}`)].join('\n');

function caught(fn: () => unknown): IvInputError {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(IvInputError);
    return e as IvInputError;
  }
  throw new Error('expected an IvInputError');
}

describe('header blocks of every usual form (invented files)', () => {
  it.each([
    ['comma-block.csv', 'HB-0001', 1000, [{ key: 'Title', value: 'Flash test report' }, { key: 'Module type', value: 'HB-36P' }, { key: 'Operator', value: 'Doe, J.' }, { key: 'Lamp hours', value: '1203 h' }]],
    ['semicolon-block.csv', 'HB-0002', 998.5, [{ key: 'Reference cell', value: 'RC-7' }]],
    ['tab-block.txt', 'HB-0003', 1000, [{ key: 'Sweep direction', value: 'Isc to Voc' }]],
    ['equals-block.txt', 'HB-0004', 1000, [{ key: 'Title', value: '[Measurement]' }, { key: 'pulse length', value: '10 ms' }]],
    ['colon-block.txt', 'HB-0005', 1000, [{ key: 'Title', value: 'I-V measurement' }, { key: 'Comment', value: 'second flash, connector re-seated' }]],
    ['hash-block.csv', 'HB-0006', 1000, [{ key: 'operator', value: 'J. Doe' }]],
  ])('%s: known keys fill the figures, unknown ones are kept, the table is the reference curve', (file, id, g, extra) => {
    const c = parseIvText(fixture(file), { fileName: file });
    expect(c.meta.device_id).toBe(id);
    expect(c.meta.irradiance_w_m2).toBeCloseTo(g as number, 9);
    // 45 °C in each file: "45", "45,0;°C", "318.15 K", "45 C", "45 °C".
    expect(c.meta.temp_c).toBeCloseTo(45, 9);
    expect(c.meta.cells).toBe(36);
    expect(c.meta.extra).toEqual(extra);
    expect(c.voltage_v).toHaveLength(refPoints.length);
    c.voltage_v.forEach((v, k) => expect(v).toBeCloseTo(refPoints[k][0], 12));
    c.current_a.forEach((i, k) => expect(i).toBeCloseTo(refPoints[k][1], 12));
  });

  it('the issue’s shape: key,value lines and a blank line before the table are no longer refused', () => {
    const c = parseIvText(['Module ID,KX-1', 'Irradiance,1000', 'Temperature,25', 'Cells,36', '', table].join('\n'));
    expect(c.meta).toEqual({ device_id: 'KX-1', irradiance_w_m2: 1000, temp_c: 25, cells: 36 });
  });

  it('area with a unit cell, and a date and a time on two lines make one measurement time', () => {
    const c = parseIvText(fixture('comma-block.csv'));
    // 0.318 m² = 3180 cm² (1 m² = 10⁴ cm²).
    expect(c.meta.area_cm2).toBeCloseTo(3180, 9);
    expect(c.meta.measured_at).toBe('2024-05-01T10:15:00');
  });

  it.each([
    ['quoted key and value', '"Module ID","KX-1"\n"Irradiance (W/m2)","950"', { device_id: 'KX-1', irradiance_w_m2: 950 }],
    ['unit in the key', 'Irradiance (kW/m2),0.95\nCell temperature [K],300.15', { irradiance_w_m2: 950, temp_c: 27 }],
    ['unit cell after the value', 'Irradiance,950,W/m²\nTemperature,27,°C', { irradiance_w_m2: 950, temp_c: 27 }],
    ['key cell ending in a colon', 'Module ID:,KX-1\nIrradiance:,950,W/m2', { device_id: 'KX-1', irradiance_w_m2: 950 }],
    ['unit glued to the key', 'irradiance_kWm2,0.95\nG_W_m2,950', { irradiance_w_m2: 950 }],
    ['suns', 'Irradiance,0.95,suns', { irradiance_w_m2: 950 }],
    ['semicolon with decimal comma', 'Irradiance;950,0;W/m2\nArea (m2);1,6', { irradiance_w_m2: 950, area_cm2: 16000 }],
    ['key = value and key: value without #', 'Cells in series = 60\nModule ID: KX-9', { cells: 60, device_id: 'KX-9' }],
    ['trailing empty cells', 'Module ID,KX-1,,,\nCells,60,,', { device_id: 'KX-1', cells: 60 }],
    ['units written other ways', 'Irradiance (W m-2),950\nTemperature_C,27\nCell temp (degC),27', { irradiance_w_m2: 950, temp_c: 27 }],
    ['a count with words', 'Cells (series),60\nModule serial no.,KX-7', { cells: 60, device_id: 'KX-7' }],
    ['a count with its unit', 'Number of cells in series,60 cells', { cells: 60 }],
  ])('%s', (_name, block, expected) => {
    const c = parseIvText(`${block}\n\n${table}`);
    for (const [k, v] of Object.entries(expected)) {
      if (typeof v === 'number') expect((c.meta as Record<string, number>)[k]).toBeCloseTo(v, 9);
      else expect((c.meta as Record<string, unknown>)[k]).toBe(v);
    }
  });

  it('a known key without a value is noted, not an error; an unusable value is an error naming the line', () => {
    const c = parseIvText(`Module ID,KX-1\nIrradiance,\nTemperature,n/a\n${table}`);
    expect(c.meta.irradiance_w_m2).toBeUndefined();
    expect(c.notes.join(' ')).toMatch(/"Irradiance" on line 2 gives no value/);
    const err = caught(() => parseIvText(`Module ID,KX-1\nIrradiance,1000,lux\n${table}`));
    expect(err.code).toBe('bad-metadata');
    expect(err.line).toBe(2);
    expect(err.message).toMatch(/irradiance must be in W\/m²/);
  });

  it('unknown keys are kept without control characters, length-bounded, at most MAX_EXTRA of them', () => {
    const lines = Array.from({ length: MAX_EXTRA + 5 }, (_, k) => `Setting ${k},value ${k}`);
    lines[0] = `Setting 0,a\u0007b${'x'.repeat(500)}`;
    const c = parseIvText(`${lines.join('\n')}\n${table}`);
    expect(c.meta.extra).toHaveLength(MAX_EXTRA);
    expect(c.meta.extra![0].value).not.toMatch(/\u0007/);
    expect(c.meta.extra![0].value.length).toBeLessThanOrEqual(200);
    expect(c.meta.extra![1]).toEqual({ key: 'Setting 1', value: 'value 1' });
    expect(c.notes.join(' ')).toMatch(/5 more metadata lines not kept/);
  });

  it('a line naming a voltage column but no current column before the real table is passed over and noted', () => {
    const c = parseIvText(`Voltage,Power\nModule ID,KX-1\n\n${table}`);
    expect(c.meta.device_id).toBe('KX-1');
    expect(c.notes.join(' ')).toMatch(/line 1 names a voltage column but not both; the table starts on line 4/);
  });
});

describe('when no table is found the error names the line', () => {
  it('a header block and no table: the last line read, and what is missing', () => {
    const err = caught(() => parseIvText('Module ID,KX-1\nIrradiance,1000\n\nOperator,J. Doe\n'));
    expect(err.code).toBe('no-header');
    expect(err.line).toBe(4);
    expect(err.message).toMatch(/^line 4: no header row naming a voltage and a current column/);
    expect(err.message).toMatch(/"Operator,J\. Doe"/);
  });

  it('a line that looks like a header but lacks a current column is the one named', () => {
    const rows = refPoints.map(([v, i]) => `${v},${i}`).join('\n');
    const err = caught(() => parseIvText(`Module ID,KX-1\nVoltage (V),Power (W)\n${rows}`));
    expect(err.code).toBe('no-current-column');
    expect(err.line).toBe(2);
    expect(err.message).toMatch(/no current column in the header \("Voltage \(V\)", "Power \(W\)"\)/);
  });

  it('numbers right after the block: the line before them is taken as the intended header', () => {
    const rows = refPoints.map(([v, i]) => `${v},${i}`).join('\n');
    const err = caught(() => parseIvText(`Module ID,KX-1\nSpannung,Strom\n${rows}`));
    expect(err.code).toBe('no-voltage-column');
    expect(err.line).toBe(2);
  });

  it('numbers after a blank line and known keys: the first number row is named', () => {
    const rows = refPoints.map(([v, i]) => `${v},${i}`).join('\n');
    const err = caught(() => parseIvText(`Module ID,KX-1\nIrradiance,1000\n\n${rows}`));
    expect(err.code).toBe('no-header');
    expect(err.line).toBe(4);
    expect(err.message).toMatch(/expected a header row naming the voltage and current columns/);
  });
});

/** Mean and (max − min)/mean of an irradiance column, computed from the text (column 3, in `scale` W/m² per unit). */
function columnStats(text: string, col: number, scale: number) {
  const lines = text.trim().split(/\r?\n/);
  const start = lines.findIndex((l) => /^Voltage/.test(l)) + 1;
  const g = lines.slice(start).map((l) => Number(l.split(',')[col]) * scale);
  const mean = g.reduce((s, x) => s + x, 0) / g.length;
  return { mean, spread_pct: ((Math.max(...g) - Math.min(...g)) / mean) * 100 };
}

describe('an irradiance column sets the measurement irradiance (invented lamp readings)', () => {
  it('steady lamp: the mean over the sweep, the spread kept, no flag below 2 %; a temperature column likewise', () => {
    const text = fixture('irradiance-column-steady.csv');
    const expected = columnStats(text, 2, 1);
    const c = parseIvText(text);
    expect(c.meta.irradiance_w_m2).toBeCloseTo(expected.mean, 9);
    expect(c.meta.irradiance_spread_pct).toBeCloseTo(expected.spread_pct, 9);
    expect(expected.spread_pct).toBeLessThan(IRRADIANCE_SPREAD_LIMIT_PCT);
    expect(c.meta.temp_c).toBeCloseTo(columnStats(text, 3, 1).mean, 9);
    const { flags, metrics } = analyseCurve(c);
    expect(flags.map((f) => f.code)).not.toContain('irradiance-unsteady');
    expect(metrics.efficiency).toBeNull(); // no area in this file
  });

  it('drifting lamp in kW/m²: the column wins over the metadata line, a note says so, and the flag says the change in words', () => {
    const text = fixture('irradiance-column-drift.csv');
    const expected = columnStats(text, 2, 1000);
    const c = parseIvText(text);
    expect(c.meta.irradiance_w_m2).toBeCloseTo(expected.mean, 9);
    expect(c.meta.irradiance_spread_pct).toBeCloseTo(expected.spread_pct, 9);
    expect(c.notes.join(' ')).toMatch(/the irradiance column "G \(kW\/m2\)" \(mean 1002\.5 W\/m²\) is used instead of the 1000 W\/m² on line 3/);
    const flag = analyseCurve(c).flags.find((f) => f.code === 'irradiance-unsteady');
    expect(flag?.severity).toBe('warn');
    expect(flag?.message).toMatch(new RegExp(`changed by ${expected.spread_pct.toFixed(1)} % of its mean .* more than 2 %`));
  });

  it.each([
    [1.9, false],
    [2.1, true],
  ])('a spread of %s %% is flagged: %s', (spread, flagged) => {
    // Readings alternate between 1000·(1 − s/2) and 1000·(1 + s/2): mean 1000, (max − min)/mean = s.
    const lo = 1000 * (1 - spread / 200);
    const hi = 1000 * (1 + spread / 200);
    const text = ['Voltage (V),Current (A),Irradiance (W/m2)', ...refPoints.map(([v, i], k) => `${v},${i},${k % 2 ? hi : lo}`)].join('\n');
    const c = parseIvText(text);
    expect(c.meta.irradiance_spread_pct).toBeCloseTo(((hi - lo) / c.meta.irradiance_w_m2!) * 100, 9);
    expect(analyseCurve(c).flags.some((f) => f.code === 'irradiance-unsteady')).toBe(flagged);
  });

  it('efficiency uses the column’s mean with the file’s area', () => {
    const text = `Area,0.318,m2\n${['Voltage,Current,Irradiance_Wm2', ...refPoints.map(([v, i], k) => `${v},${i},${990 + k}`)].join('\n')}`;
    const c = parseIvText(text);
    const { metrics } = analyseCurve(c);
    // η = Pmp / (G·A), G the mean of 990 … 990 + n − 1 = 990 + (n − 1)/2.
    const g = 990 + (refPoints.length - 1) / 2;
    expect(metrics.efficiency!).toBeCloseTo(metrics.pmp_w / (g * 0.318), 12);
  });

  it('a suns column and an empty cell: the empty cell is skipped', () => {
    const text = ['V,I,Suns', ...refPoints.map(([v, i], k) => `${v},${i},${k === 3 ? '' : 1.01}`)].join('\n');
    const c = parseIvText(text);
    expect(c.meta.irradiance_w_m2).toBeCloseTo(1010, 9);
    expect(c.meta.irradiance_spread_pct).toBeCloseTo(0, 9);
  });

  it('a value outside 0…5000 W/m² or text in the column is an error naming the line', () => {
    const rows = refPoints.map(([v, i]) => `${v},${i},1000`);
    rows[4] = `${refPoints[4][0]},${refPoints[4][1]},-5`;
    const err = caught(() => parseIvText(['V,I,G (W/m2)', ...rows].join('\n')));
    expect(err.line).toBe(6);
    expect(err.message).toMatch(/irradiance value "-5" in column "G \(W\/m2\)" is -5 W\/m²; it must lie above 0/);
    rows[4] = `${refPoints[4][0]},${refPoints[4][1]},dark`;
    expect(caught(() => parseIvText(['V,I,G (W/m2)', ...rows].join('\n'))).line).toBe(6);
  });

  it.each([
    ['irradiance_Wm2', 1, 0],
    ['G_kW_m2', 1000, 0],
    ['T_cell_C', 0, 1],
    ['temperature_K', 0, 1],
  ])('a unit glued to the column name: %s', (name, gScale, tScale) => {
    // Column 3 holds 0.95 (kW/m²) or 950 (W/m²) or 300.15 K / 27 °C.
    const value = gScale === 1000 ? 0.95 : gScale === 1 ? 950 : name.endsWith('K') ? 300.15 : 27;
    const c = parseIvText([`V,I,${name}`, ...refPoints.map(([v, i]) => `${v},${i},${value}`)].join('\n'));
    if (gScale) expect(c.meta.irradiance_w_m2).toBeCloseTo(950, 9);
    if (tScale) expect(c.meta.temp_c).toBeCloseTo(27, 9);
  });

  it('a column with an unknown irradiance unit is not used and the note says why', () => {
    const c = parseIvText(['V,I,Irradiance (lux)', ...refPoints.map(([v, i]) => `${v},${i},100000`)].join('\n'));
    expect(c.meta.irradiance_w_m2).toBeUndefined();
    expect(c.notes.join(' ')).toMatch(/not read as irradiance: unknown unit "lux"/);
  });
});
