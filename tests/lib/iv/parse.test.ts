import { IvInputError } from '@/lib/iv/errors';
import { MAX_DATA_ROWS, MAX_FILE_BYTES, parseIvBytes, parseIvText } from '@/lib/iv/parse';

// A small synthetic curve written for these tests: 12 points, 0…0.6 V, crossing zero current
// between 0.55 and 0.6 V. Values are plain numbers, not physics.
const V = [0, 0.05, 0.1, 0.15, 0.2, 0.25, 0.3, 0.35, 0.4, 0.45, 0.5, 0.55, 0.6];
const I = [0.76, 0.759, 0.758, 0.757, 0.755, 0.752, 0.748, 0.74, 0.72, 0.68, 0.55, 0.3, -0.05];

const rows = (fmt: (v: number, i: number) => string) => V.map((v, k) => fmt(v, I[k])).join('\n');

function expectError(fn: () => unknown, code: string, line?: number, text?: RegExp): IvInputError {
  let caught: unknown;
  try {
    fn();
  } catch (e) {
    caught = e;
  }
  expect(caught).toBeInstanceOf(IvInputError);
  const err = caught as IvInputError;
  expect(err.code).toBe(code);
  if (line !== undefined) {
    expect(err.line).toBe(line);
    expect(err.message).toMatch(new RegExp(`^line ${line}: `));
  }
  if (text) expect(err.message).toMatch(text);
  return err;
}

describe('parseIvText() — formats and headers', () => {
  it.each([
    ['comma CSV, V,I', `V,I\n${rows((v, i) => `${v},${i}`)}`, 1, 1],
    ['TSV, Voltage/Current', `Voltage\tCurrent\n${rows((v, i) => `${v}\t${i}`)}`, 1, 1],
    ['semicolon with decimal comma', `U;I\n${rows((v, i) => `${String(v).replace('.', ',')};${String(i).replace('.', ',')}`)}`, 1, 1],
    ['whitespace separated', `voltage current\n${rows((v, i) => `${v}   ${i}`)}`, 1, 1],
    ['units in brackets, mV and mA', `Voltage (mV),Current (mA)\n${rows((v, i) => `${v * 1000},${i * 1000}`)}`, 1, 1],
    ['units with underscore', `voltage_v,current_mA\n${rows((v, i) => `${v},${i * 1000}`)}`, 1, 1],
    ['units in square brackets', `"V [mV]","I [A]"\n${rows((v, i) => `${v * 1000},${i}`)}`, 1, 1],
    ['extra columns ignored, order swapped', `Time,Current,Temp,Voltage,P\n${rows((v, i) => `1,${i},25,${v},${v * i}`)}`, 1, 1],
    ['quoted numbers', `"V","I"\n${rows((v, i) => `"${v}","${i}"`)}`, 1, 1],
  ])('%s', (_name, text) => {
    const c = parseIvText(text);
    expect(c.voltage_v).toHaveLength(V.length);
    c.voltage_v.forEach((v, k) => expect(v).toBeCloseTo(V[k], 12));
    c.current_a.forEach((i, k) => expect(i).toBeCloseTo(I[k], 12));
  });

  it('accepts CRLF line ends, a byte-order mark and blank or comment lines among the data', () => {
    const text = `\uFEFFV,I\r\n${rows((v, i) => `${v},${i}`).replace(/\n/g, '\r\n')}\r\n\r\n# trailing comment\r\n`;
    expect(parseIvText(text).voltage_v).toHaveLength(V.length);
  });

  it('sorts a descending sweep and notes it', () => {
    const text = `V,I\n${V.map((v, k) => `${v},${I[k]}`)
      .reverse()
      .join('\n')}`;
    const c = parseIvText(text);
    expect(c.voltage_v).toEqual(V);
    expect(c.notes.join(' ')).toMatch(/sorted/);
  });

  it('turns the load sign convention around', () => {
    const c = parseIvText(`V,I\n${rows((v, i) => `${v},${-i}`)}`);
    c.current_a.forEach((i, k) => expect(i).toBeCloseTo(I[k], 12));
    expect(c.notes.join(' ')).toMatch(/load convention/);
  });

  it('averages repeated voltages', () => {
    const text = `V,I\n${rows((v, i) => `${v},${i}`)}\n0.3,0.750\n0.3,0.752`;
    const c = parseIvText(text);
    expect(c.voltage_v).toHaveLength(V.length);
    // (0.748 + 0.750 + 0.752) / 3 = 0.750 (arithmetic)
    expect(c.current_a[V.indexOf(0.3)]).toBeCloseTo(0.75, 12);
    expect(c.notes.join(' ')).toMatch(/2 repeated voltages averaged/);
  });
});

describe('parseIvText() — metadata and overrides', () => {
  const body = `V,I\n${rows((v, i) => `${v},${i}`)}`;

  it('reads metadata lines before the header', () => {
    const text = [
      '# serial: QL-2024-0042',
      '# cell temperature: 33 °C',
      '# irradiance: 1000 W/m²',
      '# cells in series: 36',
      '# area: 0.12 m²',
      '# measured at: 2024-05-01T10:00:00Z',
      '# operator: someone',
      body,
    ].join('\n');
    const c = parseIvText(text);
    // A key the reader has no field for is kept on the curve as written (meta.extra).
    expect(c.meta).toEqual({
      device_id: 'QL-2024-0042',
      temp_c: 33,
      irradiance_w_m2: 1000,
      cells: 36,
      area_cm2: 1200,
      measured_at: '2024-05-01T10:00:00.000Z',
      extra: [{ key: 'operator', value: 'someone' }],
    });
  });

  it.each([
    ['# temperature: 306.15 K', 'temp_c', 33],
    ['# Temp (°C) = 45', 'temp_c', 45],
    ['# area (cm2): 243.3', 'area_cm2', 243.3],
    ['# area: 15600 mm2', 'area_cm2', 156],
    ['# G: 0,8 kW/m2', 'irradiance_w_m2', 800],
    ['# Ns: 60', 'cells', 60],
  ])('%s', (line, key, value) => {
    const c = parseIvText(`${line}\n${body}`);
    expect((c.meta as Record<string, unknown>)[key]).toBeCloseTo(value as number, 9);
  });

  it('falls back to the file name for device_id, and lets the caller override metadata', () => {
    const c = parseIvText(`# temperature: 30\n${body}`, { fileName: '/data/flash/M-0001.csv', overrides: { temp_c: 45, cells: 36, device_id: undefined } });
    expect(c.meta).toEqual({ device_id: 'M-0001', temp_c: 45, cells: 36 });
  });

  it.each([
    ['# temperature: warm', 1, /should be a number/],
    ['# temperature: 900', 1, /between −100 °C and 250 °C/],
    ['# cells: 2.5', 1, /whole number/],
    ['# irradiance: 1000 lux', 1, /W\/m²/],
    ['# area: -3', 1, /positive/],
  ])('rejects bad metadata %p', (line, lineNo, text) => {
    expectError(() => parseIvText(`${line}\n${body}`), 'bad-metadata', lineNo, text);
  });
});

describe('parseIvText() — precise errors', () => {
  const good = rows((v, i) => `${v},${i}`).split('\n');

  it.each([
    ['no header', good.join('\n'), 'no-header', 1],
    ['no voltage column', `Current,Power\n${good.join('\n')}`, 'no-voltage-column', 1],
    ['no current column', `Voltage,Power\n${good.join('\n')}`, 'no-current-column', 1],
    ['unknown unit', `Voltage (furlong),I\n${good.join('\n')}`, 'bad-unit', 1],
    ['current density', `V,J (mA/cm2)\n${good.join('\n')}`, 'bad-unit', 1],
    ['text in a number', `V,I\n${good.slice(0, 4).join('\n')}\n0.2,abc\n${good.slice(5).join('\n')}`, 'not-a-number', 6],
    ['NaN', `V,I\n${good.slice(0, 2).join('\n')}\n0.1,NaN\n${good.slice(3).join('\n')}`, 'non-finite', 4],
    ['Infinity', `V,I\n${good.slice(0, 7).join('\n')}\nInfinity,0.1\n${good.slice(8).join('\n')}`, 'non-finite', 9],
    ['overflowing number', `V,I\n0.5,1e999\n${good.join('\n')}`, 'non-finite', 2],
    ['missing column', `V,I\n${good.slice(0, 3).join('\n')}\n0.15\n${good.slice(4).join('\n')}`, 'missing-value', 5],
    ['decimal comma in a comma file', `V,I\n${good.slice(0, 3).join('\n')}\n"0,15",0.757\n${good.slice(4).join('\n')}`, 'not-a-number', 5],
    ['too few points', `V,I\n${good.slice(0, 5).join('\n')}`, 'too-few-points', 6],
    ['empty file', '', 'no-header', 1],
  ])('%s', (_name, text, code, line) => {
    expectError(() => parseIvText(text), code, line);
  });

  it('a curve that never reaches zero current has no Voc', () => {
    const text = `V,I\n${V.slice(0, 11)
      .map((v, k) => `${v},${I[k]}`)
      .join('\n')}`;
    // The last row (line 12) still carries 0.55 A, 72 % of the largest current.
    expectError(() => parseIvText(text), 'no-voc', 12, /never falls to zero.*Extend the sweep/);
  });

  it('a sweep that starts far above 0 V has no Isc', () => {
    const text = `V,I\n${V.slice(4)
      .map((v, k) => `${v},${I[k + 4]}`)
      .join('\n')}\n0.57,0.2\n0.58,0.1\n0.59,0.02\n`;
    expectError(() => parseIvText(text), 'no-isc', 2, /never reaches 0 V.*within 10 % of Voc/);
  });

  it('a sweep starting just above 0 V is accepted (Isc extrapolated later)', () => {
    const text = `V,I\n${V.map((v, k) => `${v + 0.01},${I[k]}`).join('\n')}`;
    expect(parseIvText(text).voltage_v[0]).toBeCloseTo(0.01, 12);
  });

  it('a curve with no positive current is not an illuminated curve', () => {
    const text = `V,I\n${V.map((v) => `${v},${-1e-9 * Math.expm1(v / 0.026)}`).join('\n')}`;
    expectError(() => parseIvText(text), 'no-power');
  });

  it(`more than ${MAX_DATA_ROWS.toLocaleString('en-US')} rows is refused at the first extra row`, () => {
    const lines = ['V,I'];
    for (let k = 0; k <= MAX_DATA_ROWS; k++) lines.push(`${(k / MAX_DATA_ROWS) * 0.6},${0.76 - (k / MAX_DATA_ROWS) * 0.8}`);
    expectError(() => parseIvText(lines.join('\n')), 'too-many-rows', MAX_DATA_ROWS + 2);
  });
});

describe('parseIvBytes()', () => {
  const text = `V,I\n${rows((v, i) => `${v},${i}`)}`;

  it('reads UTF-8 bytes', () => {
    expect(parseIvBytes(new TextEncoder().encode(text)).voltage_v).toHaveLength(V.length);
  });

  it('reads UTF-16LE with a byte-order mark (spreadsheet "Unicode text")', () => {
    const u16 = new Uint8Array(2 + text.length * 2);
    u16[0] = 0xff;
    u16[1] = 0xfe;
    for (let k = 0; k < text.length; k++) u16[2 + 2 * k] = text.charCodeAt(k);
    expect(parseIvBytes(u16).current_a[0]).toBeCloseTo(0.76, 12);
  });

  it.each([
    ['over 10 MB', new Uint8Array(MAX_FILE_BYTES + 1).fill(0x20), 'too-large'],
    ['empty', new Uint8Array(0), 'empty'],
    ['binary with zero bytes', Uint8Array.from([0x56, 0x2c, 0x49, 0x0a, 0x00, 0x01, 0x02]), 'binary'],
    ['a zip / xlsx workbook', Uint8Array.from([0x50, 0x4b, 0x03, 0x04, 0x14, 0x00]), 'binary'],
    ['invalid UTF-8', Uint8Array.from([0x56, 0x2c, 0x49, 0x0a, 0xc3, 0x28, 0x0a]), 'not-utf8'],
  ])('rejects %s', (_name, bytes, code) => {
    expectError(() => parseIvBytes(bytes), code);
  });
});
