/** Units through mathjs (lib/units.ts) against the SI definitions (BIPM SI Brochure, 9th ed.: prefixes, kelvin and degree Celsius) and IEC 60904-3 (1 sun = 1000 W/m²). */
import { parseQuantity, toQuantity, unitFactor } from '@/lib/units';

describe('units typed by people', () => {
  it.each([
    ['5 mV', 'voltage', 0.005],
    ['5 MV', 'voltage', 0.005], // files write mV in capitals
    ['250 mA', 'current', 0.25],
    ['0.8 kW/m^2', 'irradiance', 800],
    ['0,8 kW/m²', 'irradiance', 800],
    ['800 W m-2', 'irradiance', 800],
    ['100 mW/cm2', 'irradiance', 1000],
    ['1.1 suns', 'irradiance', 1100],
    ['25 degC', 'temperature', 25],
    ['25 °C', 'temperature', 25],
    ['298.15 K', 'temperature', 25],
    ['77 °F', 'temperature', 25],
    ['-0.35 %/K', 'relative_per_k', -0.35],
    ['−0.0035 1/K', 'relative_per_k', -0.35],
    ['-120 mV/K', 'voltage_per_k', -0.12],
    ['-120 mV/°C', 'voltage_per_k', -0.12],
    ['1.6 m^2', 'area', 16000],
    ['350 mΩ', 'resistance', 0.35],
    ['2 mΩ/K', 'resistance_per_k', 0.002],
  ] as const)('%s as %s', (text, quantity, expected) => {
    const r = parseQuantity(text, quantity);
    expect('value' in r && r.value).toBeCloseTo(expected, 9);
  });

  it('refuses a unit of another quantity, in words', () => {
    expect(parseQuantity('5 A', 'voltage')).toEqual({ error: '"A" is not a unit of voltage (use V, mV, kV, µV)' });
    expect(parseQuantity('-120 mV/K', 'relative_per_k')).toEqual({ error: expect.stringMatching(/not a unit of relative per kelvin/) });
    expect(parseQuantity('fast', 'current')).toEqual({ error: expect.stringMatching(/not a number with a unit/) });
    expect(unitFactor('meas', 'voltage')).toBeNull();
    expect(toQuantity(3, '', 'current')).toBe(3);
  });
});
