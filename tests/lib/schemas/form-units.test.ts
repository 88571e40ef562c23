/**
 * The batch, upload and refit forms read numbers typed with units (mathjs through lib/units.ts)
 * into each field's own unit. Expected values from the SI prefixes and the kelvin–Celsius offset
 * (BIPM SI Brochure, 9th ed.: k = 10³, m = 10⁻³, 1 cm² = 10⁻⁴ m², T/K = t/°C + 273.15), and
 * 1 %/K = 0.01 1/K. A unit of another quantity is refused with a message that names the field.
 */
import { batchCreateSchema, batchUpdateSchema, refitSchema, uploadOverridesSchema } from '@/lib/schemas/curves';

const messages = (r: { success: boolean; error?: { issues: { path: PropertyKey[]; message: string }[] } }) => (r.success ? [] : r.error!.issues.map((i) => `${i.path.join('.')}: ${i.message}`));

describe('the batch form', () => {
  it('converts area, nameplate, irradiance and coefficients typed with their units', () => {
    const b = batchCreateSchema.parse({
      name: 'Lot 7',
      area_cm2: '1.6 m²',
      nameplate_w: '0.4 kW',
      irradiance_w_m2: '0.8 kW/m^2',
      alpha_pct_per_k: '0.05 %/°C',
      beta_pct_per_k: '−0.0029 1/K',
      gamma_pct_per_k: '-0.37 %/K',
      rs_ohm: '350 mΩ',
      kappa_ohm_per_k: '2 mohm/K',
    });
    expect(b.area_cm2).toBeCloseTo(16000, 9);
    expect(b.nameplate_w).toBeCloseTo(400, 9);
    expect(b.irradiance_w_m2).toBeCloseTo(800, 9);
    expect(b.alpha_pct_per_k).toBeCloseTo(0.05, 12);
    expect(b.beta_pct_per_k).toBeCloseTo(-0.29, 12);
    expect(b.gamma_pct_per_k).toBeCloseTo(-0.37, 12);
    expect(b.rs_ohm).toBeCloseTo(0.35, 12);
    expect(b.kappa_ohm_per_k).toBeCloseTo(0.002, 12);
  });

  it('keeps plain numbers in the unit the label names, and empty fields empty', () => {
    const b = batchCreateSchema.parse({ name: 'Lot 8', area_cm2: '244', nameplate_w: 405, beta_pct_per_k: '−0,29', cells: '60', rs_ohm: '' });
    expect([b.area_cm2, b.nameplate_w, b.beta_pct_per_k, b.cells, b.rs_ohm, b.gamma_pct_per_k]).toEqual([244, 405, -0.29, 60, null, null]);
    expect(batchCreateSchema.parse({ name: 'Lot 9', area_cm2: '2.44e2' }).area_cm2).toBe(244);
  });

  it('checks the range after converting, in the field’s own unit', () => {
    // 6 kW is 6000 W, above the nameplate's 5000 W.
    expect(messages(batchCreateSchema.safeParse({ name: 'x', nameplate_w: '6 kW' }))).toEqual(['nameplate_w: Nameplate power (W) must be a number from 0.001 to 5000.']);
  });

  it('refuses a unit of another quantity, naming the field', () => {
    expect(messages(batchCreateSchema.safeParse({ name: 'x', area_cm2: '244 cm', nameplate_w: '0.4 kWh' }))).toEqual([
      'area_cm2: Area (cm²): "cm" is not a unit of area (use cm², m², mm²)',
      'nameplate_w: Nameplate power (W): "kWh" is not a unit of power (use W, kW, mW)',
    ]);
  });

  it('refuses an absolute coefficient for a relative one, saying why', () => {
    const m = messages(batchUpdateSchema.safeParse({ beta_pct_per_k: '-120 mV/K' }));
    expect(m).toHaveLength(1);
    expect(m[0]).toMatch(/^beta_pct_per_k: β, Voc temperature coefficient \(%\/K\): "mV\/K" is not a unit of relative per kelvin/);
    expect(m[0]).toMatch(/needs the module's Voc at 25 °C/);
  });

  it('a word is not a number: the number schema’s own message', () => {
    expect(messages(batchCreateSchema.safeParse({ name: 'x', area_cm2: 'large' }))).toEqual(['area_cm2: Area (cm²) must be a number from 0.01 to 100000.']);
  });
});

describe('the upload and refit forms', () => {
  it('read a temperature in K or °F, an irradiance in suns and an area in mm²', () => {
    const u = uploadOverridesSchema.parse({ temp_c: '318.15 K', irradiance_w_m2: '1 sun', area_cm2: '15600 mm²' });
    expect(u.temp_c).toBeCloseTo(45, 9);
    expect(u.irradiance_w_m2).toBeCloseTo(1000, 9);
    expect(u.area_cm2).toBeCloseTo(156, 9);
    expect(refitSchema.parse({ temp_c: '77 °F' }).temp_c).toBeCloseTo(25, 9);
    expect(messages(refitSchema.safeParse({ temp_c: '25 V' }))).toEqual(['temp_c: Cell temperature (°C): "V" is not a unit of temperature (use °C (degC), K, °F (degF))']);
  });
});
