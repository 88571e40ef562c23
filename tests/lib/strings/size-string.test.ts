import { StringSizingError } from '@/lib/strings/errors';
import { betaVocFromMeasurements, sizeString, worstModule, type StringSizingInput } from '@/lib/strings/size-string';

describe('sizeString() — worked examples by hand', () => {
  // Voc,max = N·Voc,STC·(1 + β·(T_min − 25 °C)), β in %/K ÷ 100.
  it.each([
    // Example 1: Voc,STC 49.5 V, β −0.28 %/K, T_min −10 °C, limit 1500 V
    //   ΔT = −10 − 25 = −35 K; β·ΔT = −0.0028 × −35 = +0.098
    //   Voc,max = 49.5 × 1.098 = 54.351 V; 1500 / 54.351 = 27.598 → N = 27
    //   string = 27 × 54.351 = 1467.477 V; margin = 1500 − 1467.477 = 32.523 V
    [{ vocStc_V: 49.5, betaVoc_pct_per_K: -0.28, tMin_C: -10, vSys_V: 1500 }, 54.351, 27, 1467.477, 32.523],
    // Example 2: 37.2 V, −0.30 %/K, −25 °C, 1000 V
    //   ΔT = −50 K; factor = 1 + 0.003 × 50 = 1.15; Voc,max = 37.2 × 1.15 = 42.78 V
    //   1000 / 42.78 = 23.375 → 23; 23 × 42.78 = 983.94 V; margin 16.06 V
    [{ vocStc_V: 37.2, betaVoc_pct_per_K: -0.3, tMin_C: -25, vSys_V: 1000 }, 42.78, 23, 983.94, 16.06],
    // Example 3, exactly on the limit: 40 V, −0.5 %/K, −15 °C → factor 1 + 0.005 × 40 = 1.2 → 48 V;
    //   960 / 48 = 20 exactly → 20 modules, string 960 V, margin 0 (the limit itself is allowed)
    [{ vocStc_V: 40, betaVoc_pct_per_K: -0.5, tMin_C: -15, vSys_V: 960 }, 48, 20, 960, 0],
    // Example 4, warm site: 45 V, −0.3 %/K, 5 °C → factor 1 + 0.003 × 20 = 1.06 → 47.7 V;
    //   1500 / 47.7 = 31.45 → 31; 31 × 47.7 = 1478.7 V; margin 21.3 V
    [{ vocStc_V: 45, betaVoc_pct_per_K: -0.3, tMin_C: 5, vSys_V: 1500 }, 47.7, 31, 1478.7, 21.3],
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
      vocStc_V: 49.5,
      betaVoc_pct_per_K: -0.28,
      tMin_C: -10,
      vSys_V: 1500,
      tCellMax_C: 70,
      vmpStc_V: 41.5,
      betaVmp_pct_per_K: -0.37,
      mppWindow: { min_V: 500, max_V: 1300 },
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
      vocStc_V: 49.5,
      betaVoc_pct_per_K: -0.28,
      tMin_C: -10,
      vSys_V: 600,
      tCellMax_C: 70,
      vmpStc_V: 41.5,
      betaVmp_pct_per_K: -0.37,
      mppWindow: { min_V: 500, max_V: 580 },
    });
    expect(r.fits).toBe(false);
    expect(r.warnings.join(' ')).toMatch(/No string length fits: .* at least 15 .* at most 11/);
  });
});

describe('sizeString() — bad input', () => {
  const base: StringSizingInput = { vocStc_V: 49.5, betaVoc_pct_per_K: -0.28, tMin_C: -10, vSys_V: 1500 };

  it.each([
    [{ betaVoc_pct_per_K: 0.28 }, /positive \(0\.28 %\/K\).*Check the sign/],
    [{ betaVoc_pct_per_K: 0 }, /0 %\/K/],
    [{ betaVoc_pct_per_K: -2.8 }, /not mV\/K/],
    [{ tMin_C: 28 }, /above 25 °C/],
    [{ vSys_V: 2000 }, /above the 1500 V DC/],
  ])('warns on %j but still answers', (patch, message) => {
    const r = sizeString({ ...base, ...patch });
    expect(r.warnings.some((w) => message.test(w))).toBe(true);
  });

  it('a positive coefficient gives a lower cold Voc than STC and says why that is dangerous', () => {
    // 49.5 × (1 + 0.0028 × −35) = 49.5 × 0.902 = 44.649 V — lower than at STC
    const r = sizeString({ ...base, betaVoc_pct_per_K: 0.28 });
    expect(r.voc_max_per_module_v).toBeCloseTo(44.649, 9);
    expect(r.warnings[0]).toMatch(/too many modules/);
  });

  it.each([
    [{ vocStc_V: undefined }, /vocStc_V is missing/],
    [{ betaVoc_pct_per_K: undefined }, /betaVoc_pct_per_K is missing/],
    [{ tMin_C: undefined }, /tMin_C is missing/],
    [{ vSys_V: undefined }, /vSys_V is missing/],
    [{ vocStc_V: Number.NaN }, /vocStc_V is NaN, not a number/],
    [{ vSys_V: '1500' }, /vSys_V is "1500", not a number/],
    [{ vocStc_V: -3 }, /must be above 0 V/],
    [{ vSys_V: 0 }, /must be above 0 V/],
    [{ tMin_C: -61 }, /tMin_C is -61 °C, outside -60…\+100 °C/],
    [{ tMin_C: 101 }, /outside/],
    [{ tCellMax_C: 120 }, /tCellMax_C is 120 °C/],
    [{ tCellMax_C: -20 }, /look swapped/],
    [{ vSys_V: 50 }, /limit \(50 V\) is below one module's cold-weather Voc \(54\.351 V at -10 °C\)/],
    [{ mppWindow: { min_V: 500, max_V: 1300 } }, /vmpStc_V is missing/],
    [{ mppWindow: { min_V: 500, max_V: 1300 }, vmpStc_V: 41.5, betaVmp_pct_per_K: -0.37 }, /tCellMax_C is missing/],
    [{ mppWindow: { min_V: 900, max_V: 500 }, vmpStc_V: 41.5, betaVmp_pct_per_K: -0.37, tCellMax_C: 70 }, /not a window/],
    [{ vmpStc_V: 55, betaVmp_pct_per_K: -0.37 }, /must lie between 0 V and vocStc_V/],
    [{ betaVoc_pct_per_K: -3, tMin_C: 60 }, /gives a voltage ≤ 0/], // 1 − 0.03 × 35 < 0
  ])('throws on %j', (patch, message) => {
    expect(() => sizeString({ ...base, ...patch } as StringSizingInput)).toThrow(StringSizingError);
    expect(() => sizeString({ ...base, ...patch } as StringSizingInput)).toThrow(message);
  });
});

describe('worstModule()', () => {
  it('picks the highest Voc, not the mean, and says so', () => {
    const w = worstModule([
      { deviceId: 'A1', voc_v: 49.1 },
      { deviceId: 'A2', voc_v: 49.6 },
      { deviceId: 'A3', voc_v: null },
      { deviceId: 'A4', voc_v: 49.3 },
    ]);
    expect(w.deviceId).toBe('A2');
    expect(w.index).toBe(1);
    expect(w.count).toBe(3);
    expect(w.mean_voc_v).toBeCloseTo((49.1 + 49.6 + 49.3) / 3, 12);
    expect(w.note).toBe('Sized on the highest-Voc module of 3 (A2, 49.6 V), not the batch mean (49.333 V), so that no module in the string exceeds the voltage used here.');
  });

  it.each([
    [[], /no module in the batch has a Voc/],
    [[{ deviceId: 'x', voc_v: null }], /no module/],
    [[{ deviceId: 'x', voc_v: -1 }], /module 0 \("x"\): voc_v is -1/],
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
      { tempC: 15, voc_v: 41.2 },
      { tempC: 25, voc_v: 40 },
      { tempC: 50, voc_v: 37 },
      { tempC: 75, voc_v: 34 },
    ]);
    expect(m.betaVoc_pct_per_K).toBeCloseTo(-0.3, 12);
    expect(m.slope_V_per_K).toBeCloseTo(-0.12, 12);
    expect(m.vocAt25_V).toBeCloseTo(40, 12);
    expect(m.r2).toBeCloseTo(1, 12);
    expect(m.warnings).toEqual([]);
  });

  it('warns on a narrow span and rejects a single temperature', () => {
    expect(betaVocFromMeasurements([{ tempC: 25, voc_v: 40 }, { tempC: 30, voc_v: 39.4 }]).warnings[0]).toMatch(/span only 5 K/);
    expect(() => betaVocFromMeasurements([{ tempC: 25, voc_v: 40 }, { tempC: 25, voc_v: 40.1 }])).toThrow(/same temperature/);
    expect(() => betaVocFromMeasurements([{ tempC: 25, voc_v: 40 }])).toThrow(/two or more temperatures/);
  });
});
