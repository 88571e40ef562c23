/**
 * The physics forms' own checks: an error per field in the form's words with sensibly rounded
 * numbers, and no request unless every field is valid. Ranges from the silicon model
 * (lib/physics/materials.ts: 150–500 K, dopants up to 2×10²¹ cm⁻³); 0 °C = 273.15 K (SI).
 */
import { checkExplorer, checkRange } from '@/lib/schemas/physics-form';

const base = { tempText: '300', unit: 'K' as const, type: 'p' as const, dopingText: '1e16', excessText: '1e15' };

describe('checkExplorer', () => {
  it('valid input gives the request and no error', () => {
    const r = checkExplorer(base);
    expect(r.errors).toEqual({});
    expect(r.request).toEqual({ type: 'p', doping_cm3: 1e16, excess_cm3: 1e15, generation_cm3_s: undefined, lifetime_s: undefined, temp_k: 300 });
  });

  it('a temperature in °C becomes kelvin without binary noise (26.85 °C → 300 K)', () => {
    expect(checkExplorer({ ...base, unit: 'C', tempText: '26.85' }).temp_k).toBe(300);
  });

  it('−300 °C is refused at the field in °C with rounded bounds, and nothing is asked', () => {
    const r = checkExplorer({ ...base, unit: 'C', tempText: '-300' });
    expect(r.request).toBeNull();
    expect(r.temp_k).toBeNull();
    expect(r.errors).toEqual({ temp: 'Temperature (°C) must be from −123.15 to 226.85, the crystalline silicon model\'s range (−300 is outside).' });
    expect(r.errors.temp).not.toMatch(/\d{7,}|tempK|temp_k/);
  });

  it.each([
    [{ dopingText: 'lots' }, 'doping', 'Doping density (cm⁻³) must be a number, e.g. 1e16.'],
    [{ dopingText: '-1' }, 'doping', 'Doping density (cm⁻³) must not be negative.'],
    [{ dopingText: '3e21' }, 'doping', 'Doping density (cm⁻³) must be at most 2.0×10²¹, the solubility limit of dopants in crystalline silicon (3.00×10²¹ is above).'],
    [{ excessText: '' }, 'excess', 'Enter the excess carrier density in cm⁻³, e.g. 1e16.'],
    [{ tempText: 'warm' }, 'temp', 'Temperature (K) must be a number.'],
  ])('%j: one error, at its field', (change, field, message) => {
    const r = checkExplorer({ ...base, ...change });
    expect(r.request).toBeNull();
    expect(r.errors).toEqual({ [field]: message });
  });
});

describe('checkRange', () => {
  it('empty ends take the defaults', () => {
    expect(checkRange('', '', 'K', { from: 200, to: 400 })).toEqual({ range: { from: 200, to: 400 }, errors: {} });
  });

  it('"from" above "to" is said at "To"', () => {
    expect(checkRange('350', '250', 'K', { from: 200, to: 400 })).toEqual({ range: null, errors: { to: 'To (K) must be above From (350 K).' } });
    expect(checkRange('', '-50', '°C', { from: -40, to: 85 })).toEqual({ range: null, errors: { to: 'To (°C) must be above From (−40 °C).' } });
  });

  it('an end outside the model is said at that end', () => {
    const r = checkRange('100', '', 'K', { from: 200, to: 400 });
    expect(r.range).toBeNull();
    expect(r.errors.from).toMatch(/^From \(K\) must be from 150 to 500/);
    expect(r.errors.to).toBeUndefined();
  });
});
