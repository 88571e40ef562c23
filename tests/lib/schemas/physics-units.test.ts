/** Translation inputs typed with units (mathjs through lib/units.ts): converted to the field's unit; SI prefixes (BIPM SI Brochure) and 1 %/K = 0.01 1/K. */
import { translateSchema } from '@/lib/schemas/physics';

it('reads coefficients and conditions typed with their units', () => {
  const r = translateSchema.parse({ method: 'iec60891-1', to: { irradiance_w_m2: '0.8 kW/m²', temp_c: '298.15 K' }, alpha_a_per_k: '4.5 mA/K', beta_v_per_k: '−125 mV/°C', rs_ohm: '350 mΩ', kappa_ohm_per_k: '2 mΩ/K' });
  expect(r.to.irradiance_w_m2).toBeCloseTo(800, 9);
  expect(r.to.temp_c).toBeCloseTo(25, 9);
  expect(r.alpha_a_per_k).toBeCloseTo(0.0045, 12);
  expect(r.beta_v_per_k).toBeCloseTo(-0.125, 12);
  expect(r.rs_ohm).toBeCloseTo(0.35, 12);
  expect(r.kappa_ohm_per_k).toBeCloseTo(0.002, 12);
  const p2 = translateSchema.parse({ method: 'iec60891-2', to: { irradiance_w_m2: 1000, temp_c: 25 }, alpha_rel_per_k: '0.05 %/K', beta_rel_per_k: '-0.003', rs_ohm: '0.3', kappa_ohm_per_k: 0, a_irradiance: '0.04' });
  expect(p2.alpha_rel_per_k).toBeCloseTo(0.0005, 12);
  expect(p2.beta_rel_per_k).toBe(-0.003);
  expect(translateSchema.parse({ method: 'model', to: { irradiance_w_m2: '1e3', temp_c: 25 } }).to.irradiance_w_m2).toBe(1000);
});

it('says which unit a field takes when another is typed', () => {
  const r = translateSchema.safeParse({ method: 'iec60891-1', to: { irradiance_w_m2: 1000, temp_c: 25 }, alpha_a_per_k: '4 mV/K', beta_v_per_k: -0.1, rs_ohm: 0.3, kappa_ohm_per_k: 0 });
  expect(r.success).toBe(false);
  expect(r.error?.issues[0].message).toBe('alpha_a_per_k: "mV/K" is not a unit of current per kelvin (use A/K, mA/K)');
});
