import { StringSizingError } from '@/lib/strings/errors';
import { betaVocFromMeasurements, sizeString, worstModule, type StringSizingInput } from '@/lib/strings/size-string';

describe('sizeString() — worked examples by hand', () => {
  // Voc,max = N·Voc,STC·(1 + β·(T_min − 25 °C)), β in %/K ÷ 100.
  it.each([
    // Example 1: Voc,STC 49.5 V, β −0.28 %/K, T_min −10 °C, limit 1500 V
    //   ΔT = −10 − 25 = −35 K; β·ΔT = −0.0028 × −35 = +0.098
    //   Voc,max = 49.5 × 1.098 = 54.351 V; 1500 / 54.351 = 27.598 → N = 27
    //   string = 27 × 54.351 = 1467.477 V; margin = 1500 − 1467.477 = 32.523 V
    [{ voc_stc_v: 49.5, beta_voc_pct_per_k: -0.28, t_min_c: -10, v_sys_v: 1500 }, 54.351, 27, 1467.477, 32.523],
    // Example 2: 37.2 V, −0.30 %/K, −25 °C, 1000 V
    //   ΔT = −50 K; factor = 1 + 0.003 × 50 = 1.15; Voc,max = 37.2 × 1.15 = 42.78 V
    //   1000 / 42.78 = 23.375 → 23; 23 × 42.78 = 983.94 V; margin 16.06 V
    [{ voc_stc_v: 37.2, beta_voc_pct_per_k: -0.3, t_min_c: -25, v_sys_v: 1000 }, 42.78, 23, 983.94, 16.06],
    // Example 3, exactly on the limit: 40 V, −0.5 %/K, −15 °C → factor 1 + 0.005 × 40 = 1.2 → 48 V;
    //   960 / 48 = 20 exactly → 20 modules, string 960 V, margin 0 (the limit itself is allowed)
    [{ voc_stc_v: 40, beta_voc_pct_per_k: -0.5, t_min_c: -15, v_sys_v: 960 }, 48, 20, 960, 0],
    // Example 4, warm site: 45 V, −0.3 %/K, 5 °C → factor 1 + 0.003 × 20 = 1.06 → 47.7 V;
    //   1500 / 47.7 = 31.45 → 31; 31 × 47.7 = 1478.7 V; margin 21.3 V
    [{ voc_stc_v: 45, beta_voc_pct_per_k: -0.3, t_min_c: 5, v_sys_v: 1500 }, 47.7, 31, 1478.7, 21.3],
  ])('%j', (input, vocMax, n, stringVoc, margin) => {
    const r = sizeString(input);
    expect(r.voc_max_per_module_v).toBeCloseTo(vocMax, 9);
    expect(r.max_modules).toBe(n);
    expect(r.string_voc_max_v).toBeCloseTo(stringVoc, 9);
    expect(r.margin_v).toBeCloseTo(margin, 9);
    expect(r.warnings).toEqual([]);
    expect(r.above_elv).toBe(true);
  });

  it('sizes the MPP side: least modules when hot, most within the window when cold', () => {
    // Vmp,STC 41.5 V, β_Vmp −0.37 %/K
    //   hot, 70 °C: 41.5 × (1 − 0.0037 × 45) = 41.5 × 0.8335 = 34.59025 V; 500 / 34.59025 = 14.455 → 15
    //   cold, −10 °C: 41.5 × (1 + 0.0037 × 35) = 41.5 × 1.1295 = 46.87425 V; 1300 / 46.87425 = 27.73 → 27
    const r = sizeString({
      voc_stc_v: 49.5,
      beta_voc_pct_per_k: -0.28,
      t_min_c: -10,
      v_sys_v: 1500,
      t_cell_max_c: 70,
      vmp_stc_v: 41.5,
      beta_vmp_pct_per_k: -0.37,
      mpp_window_min_v: 500, mpp_window_max_v: 1300,
    });
    expect(r.vmp_min_per_module_v).toBeCloseTo(34.59025, 9);
    expect(r.vmp_max_per_module_v).toBeCloseTo(46.87425, 9);
    expect(r.min_modules).toBe(15);
    expect(r.max_modules_mpp).toBe(27);
    expect(r.fits).toBe(true);
    expect(r.warnings).toEqual([]);
  });

  it('says when no string length fits both ends', () => {
    // limit 600 V: 600 / 54.351 = 11.04 → 11 < 15 needed for the MPP window
    const r = sizeString({
      voc_stc_v: 49.5,
      beta_voc_pct_per_k: -0.28,
      t_min_c: -10,
      v_sys_v: 600,
      t_cell_max_c: 70,
      vmp_stc_v: 41.5,
      beta_vmp_pct_per_k: -0.37,
      mpp_window_min_v: 500, mpp_window_max_v: 580,
    });
    expect(r.fits).toBe(false);
    expect(r.warnings.join(' ')).toMatch(/No string length fits: .* at least 15 .* at most 11/);
  });
});

describe('sizeString() — bad input', () => {
  const base: StringSizingInput = { voc_stc_v: 49.5, beta_voc_pct_per_k: -0.28, t_min_c: -10, v_sys_v: 1500 };

  it.each([
    [{ beta_voc_pct_per_k: 0.28 }, /positive \(0\.28 %\/K\).*Check the sign/],
    [{ beta_voc_pct_per_k: 0 }, /0 %\/K/],
    [{ beta_voc_pct_per_k: -2.8 }, /not mV\/K/],
    [{ t_min_c: 28 }, /above 25 °C/],
    [{ v_sys_v: 2000 }, /above the 1500 V DC/],
  ])('warns on %j but still answers', (patch, message) => {
    const r = sizeString({ ...base, ...patch });
    expect(r.warnings.some((w) => message.test(w))).toBe(true);
  });

  it('a positive coefficient gives a lower cold Voc than STC and says why that is dangerous', () => {
    // 49.5 × (1 + 0.0028 × −35) = 49.5 × 0.902 = 44.649 V — lower than at STC
    const r = sizeString({ ...base, beta_voc_pct_per_k: 0.28 });
    expect(r.voc_max_per_module_v).toBeCloseTo(44.649, 9);
    expect(r.warnings[0]).toMatch(/too many modules/);
  });

  it.each([
    [{ voc_stc_v: undefined }, /voc_stc_v is missing/],
    [{ beta_voc_pct_per_k: undefined }, /beta_voc_pct_per_k is missing/],
    [{ t_min_c: undefined }, /t_min_c is missing/],
    [{ v_sys_v: undefined }, /v_sys_v is missing/],
    [{ voc_stc_v: Number.NaN }, /voc_stc_v is NaN, not a number/],
    [{ v_sys_v: '1500' }, /v_sys_v is "1500", not a number/],
    [{ voc_stc_v: -3 }, /must be above 0 V/],
    [{ v_sys_v: 0 }, /must be above 0 V/],
    [{ t_min_c: -61 }, /t_min_c is -61 °C, outside -60…\+100 °C/],
    [{ t_min_c: 101 }, /outside/],
    [{ t_cell_max_c: 120 }, /t_cell_max_c is 120 °C/],
    [{ t_cell_max_c: -20 }, /look swapped/],
    [{ v_sys_v: 50 }, /limit \(50 V\) is below one module's cold-weather Voc \(54\.351 V at -10 °C\)/],
    [{ mpp_window_min_v: 500, mpp_window_max_v: 1300 }, /vmp_stc_v is missing/],
    [{ mpp_window_min_v: 500, mpp_window_max_v: 1300, vmp_stc_v: 41.5, beta_vmp_pct_per_k: -0.37 }, /t_cell_max_c is missing/],
    [{ mpp_window_min_v: 900, mpp_window_max_v: 500, vmp_stc_v: 41.5, beta_vmp_pct_per_k: -0.37, t_cell_max_c: 70 }, /not a window/],
    [{ vmp_stc_v: 55, beta_vmp_pct_per_k: -0.37 }, /must lie between 0 V and voc_stc_v/],
    [{ beta_voc_pct_per_k: -3, t_min_c: 60 }, /gives a voltage ≤ 0/], // 1 − 0.03 × 35 < 0
  ])('throws on %j', (patch, message) => {
    expect(() => sizeString({ ...base, ...patch } as StringSizingInput)).toThrow(StringSizingError);
    expect(() => sizeString({ ...base, ...patch } as StringSizingInput)).toThrow(message);
  });
});

describe('worstModule()', () => {
  it('picks the highest Voc, not the mean, and says so', () => {
    const w = worstModule([
      { device_id: 'A1', voc_v: 49.1 },
      { device_id: 'A2', voc_v: 49.6 },
      { device_id: 'A3', voc_v: null },
      { device_id: 'A4', voc_v: 49.3 },
    ]);
    expect(w.device_id).toBe('A2');
    expect(w.index).toBe(1);
    expect(w.count).toBe(3);
    expect(w.mean_voc_v).toBeCloseTo((49.1 + 49.6 + 49.3) / 3, 12);
    expect(w.note).toBe('Sized on the highest-Voc module of 3 (A2, 49.6 V), not the batch mean (49.333 V), so that no module in the string exceeds the voltage used here.');
  });

  it.each([
    [[], /no module in the batch has a Voc/],
    [[{ device_id: 'x', voc_v: null }], /no module/],
    [[{ device_id: 'x', voc_v: -1 }], /module 0 \("x"\): voc_v is -1/],
  ])('rejects %j', (list, message) => {
    expect(() => worstModule(list)).toThrow(message);
  });
});

describe('betaVocFromMeasurements()', () => {
  it('recovers the coefficient of a straight Voc(T) line built by hand', () => {
    // Voc(T) = 40 V·(1 − 0.003·(T − 25)): at 15, 25, 50, 75 °C → 41.2, 40, 37, 34 V;
    // slope −0.12 V/K, Voc(25) 40 V → β = −0.12/40 × 100 = −0.3 %/K
    // (−0.3 %/K is also the common-practice value for crystalline silicon).
    const m = betaVocFromMeasurements([
      { temp_c: 15, voc_v: 41.2 },
      { temp_c: 25, voc_v: 40 },
      { temp_c: 50, voc_v: 37 },
      { temp_c: 75, voc_v: 34 },
    ]);
    expect(m.beta_voc_pct_per_k).toBeCloseTo(-0.3, 12);
    expect(m.slope_v_per_k).toBeCloseTo(-0.12, 12);
    expect(m.voc_at_25_v).toBeCloseTo(40, 12);
    expect(m.r2).toBeCloseTo(1, 12);
    expect(m.warnings).toEqual([]);
  });

  it('warns on a narrow span and rejects a single temperature', () => {
    expect(betaVocFromMeasurements([{ temp_c: 25, voc_v: 40 }, { temp_c: 30, voc_v: 39.4 }]).warnings[0]).toMatch(/span only 5 K/);
    expect(() => betaVocFromMeasurements([{ temp_c: 25, voc_v: 40 }, { temp_c: 25, voc_v: 40.1 }])).toThrow(/same temperature/);
    expect(() => betaVocFromMeasurements([{ temp_c: 25, voc_v: 40 }])).toThrow(/two or more temperatures/);
  });
});
