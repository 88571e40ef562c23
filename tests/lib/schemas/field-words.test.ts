/**
 * Field names in a person's words: a validation issue names its field as the form labels it
 * (label and unit from lib/vocabulary.ts), and an engine's message has its keys replaced by labels.
 */
import { z } from 'zod';
import { batchCreateSchema } from '@/lib/schemas/curves';
import { fieldLabel, issueText, keysToWords } from '@/lib/schemas/field-words';
import { bandDiagramSchema, curvePhysicsQuerySchema, materialQuerySchema, translateSchema } from '@/lib/schemas/physics';
import { specSaveSchema } from '@/lib/schemas/quality';
import { stringSizeSchema } from '@/lib/schemas/strings';

const KEY = /\b(temp_k|doping_cm3|excess_cm3|temp_c|irradiance_w_m2|cells|area_cm2|stc_pmp_w|limits|min|max|from_k|to_k|from_c|to_c|mpp_window_max_v|t_cell_max_c)\b/;

/** Every issue of a failed parse, as issueText writes it. */
function texts(schema: z.ZodType, input: unknown): string[] {
  const r = schema.safeParse(input);
  if (r.success) throw new Error('the input was expected to fail');
  return r.error.issues.map(issueText);
}

describe('fieldLabel', () => {
  it.each([
    [['temp_k'], 'Temperature (K)'],
    [['doping_cm3'], 'Doping density (cm⁻³)'],
    [['to', 'temp_c'], 'Target cell temperature (°C)'],
    [['limits', 'stc_pmp_w', 'min'], 'Pmax at STC (W) minimum'],
    [['limits', 'ff', 'max'], 'FF (%) maximum'],
    [['power_classes', 'step_w'], 'Power class step (W)'],
    [['batch_date'], 'Date'],
    [['cells'], 'Cells in series'],
  ])('%j → %s', (path, label) => {
    expect(fieldLabel(path)).toBe(label);
  });
});

describe('validation messages name the field, never the key', () => {
  it.each([
    ['band diagram: doping', bandDiagramSchema, { type: 'p', doping_cm3: 'lots', excess_cm3: 0, temp_k: 300 }, 'Doping density (cm⁻³) must be a number.'],
    ['band diagram: temperature', bandDiagramSchema, { type: 'p', doping_cm3: 1e16, excess_cm3: 0, temp_k: 'warm' }, 'Temperature (K) must be a number.'],
    ['material: from above to', materialQuerySchema, { from_k: '350', to_k: '250' }, 'To (K) must be above From (350 K).'],
    ['Voc chart: from equal to', curvePhysicsQuerySchema, { from_c: '20', to_c: '20' }, 'To (°C) must be above From (20 °C).'],
    ['translation: target', translateSchema, { method: 'model', to: { irradiance_w_m2: 1000, temp_c: 'warm' } }, 'Target cell temperature (°C) must be a number.'],
    ['batch: area', batchCreateSchema, { name: 'x', area_cm2: '-3' }, 'Area (cm²) must be a number from 0.01 to 100000.'],
    ['spec: a limit', specSaveSchema, { name: 'x', limits: { stc_pmp_w: { min: 'a lot' } } }, 'Pmax at STC (W) minimum must be a number'],
    ['spec: min above max in %', specSaveSchema, { name: 'x', limits: { ff: { min: 0.8, max: 0.7 } } }, 'FF (%): the minimum 80.0 % is above the maximum 70.0 %'],
    ['strings: MPP window upside down', stringSizeSchema, { t_min_c: -10, v_sys_v: 1000, mpp_window_min_v: 900, mpp_window_max_v: 500 }, 'MPP window to (V) must be above MPP window from (900 V).'],
    ['strings: hottest cell below the record low', stringSizeSchema, { t_min_c: 10, t_cell_max_c: -5, v_sys_v: 1000 }, 'Hottest cell temperature (°C) must not be below the record low ambient (10 °C).'],
  ] as const)('%s', (_what, schema, input, message) => {
    const all = texts(schema as z.ZodType, input);
    expect(all).toContain(message);
    for (const t of all) expect(t).not.toMatch(KEY);
  });

  it('a range that is the right way round passes', () => {
    expect(materialQuerySchema.parse({ temp_k: '310', from_k: '250', to_k: '350' })).toEqual({ temp_k: 310, from_k: 250, to_k: 350 });
    expect(curvePhysicsQuerySchema.parse({})).toEqual({ from_c: -40, to_c: 85 });
  });
});

describe('keysToWords', () => {
  it.each([
    ['temp_k = −26.85 K is outside the silicon model\'s range 150–500 K', 'Temperature = −26.85 K is outside the silicon model\'s range 150–500 K'],
    ['doping_cm3 = 3e21 cm⁻³ exceeds the solubility limit', 'Doping density = 3e21 cm⁻³ exceeds the solubility limit'],
    ['to.temp_c = 500 °C is above 150 °C', 'Target cell temperature = 500 °C is above 150 °C'],
    ['t_cell_max_c (−5 °C) is below t_min_c (10 °C): the two look swapped', 'Hottest cell temperature (−5 °C) is below Record low ambient (10 °C): the two look swapped'],
  ])('%s', (message, words) => {
    expect(keysToWords(message)).toBe(words);
  });

  it('leaves words alone that are keys only without a unit (n, p, min)', () => {
    expect(keysToWords('the n and p of a min')).toBe('The n and p of a min');
  });
});
