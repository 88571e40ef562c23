/**
 * Batches of different kinds (cells against modules, other cell counts): which figures are put
 * per cell, which are compared as measured, and when the t-test is refused, in words. Devices are
 * invented for this test; the per-cell arithmetic is checked by hand (40.2 V / 60 cells = 0.67 V).
 */
import { batchKind, compareKinds, kindLabel, perCellLabel, perCellValues, SERIES_KEYS } from '@/lib/quality/compare-kinds';
import type { ParamKey } from '@/lib/quality/params';
import { deviceSeverity, flagSeverity } from '@/lib/quality/severity';

type Dev = { cells: number | null; values: Partial<Record<string, number | null>> };
const dev = (cells: number | null, voc_v: number, isc_a = 9, ff = 0.78): Dev => ({ cells, values: { voc_v, isc_a, ff, pmp_w: voc_v * isc_a * ff } });

const cells = [dev(1, 0.67), dev(1, 0.68), dev(1, 0.66)];
const modules60 = [dev(60, 40.2), dev(60, 40.8), dev(60, 39.6)];
const modules72 = [dev(72, 48.2), dev(72, 48.9)];
const unknown = [dev(null, 40.1), dev(60, 40.3)];

const names = new Map([['C', 'Incoming cells'], ['M', 'Line 2 modules'], ['L', '72-cell line'], ['U', 'Lot without counts']]);
const devices = new Map<string, Dev[]>([['C', cells], ['M', modules60], ['L', modules72], ['U', unknown]]);
const kind = (id: string) => batchKind(id, devices.get(id)!);

describe('kinds in words', () => {
  it.each([
    [[1], 0, 3, 'single cells'],
    [[60], 0, 3, '60-cell modules'],
    [[36, 72], 0, 3, 'modules of 36 to 72 cells'],
    [[1, 60], 0, 4, 'cells and modules of up to 60 cells'],
    [[], 4, 4, 'cells in series not given'],
    [[60], 1, 2, '60-cell modules, 1 of 2 devices without a cell count'],
  ] as const)('%j, %i without of %i → %s', (c, without, n, text) => {
    expect(kindLabel(c, without, n)).toBe(text);
  });

  it('a batch kind counts the devices that do not say', () => {
    expect(kind('U')).toEqual({ batch_id: 'U', cells: [60], without_cells: 1, label: '60-cell modules, 1 of 2 devices without a cell count' });
  });
});

describe('compareKinds', () => {
  it('one kind: as measured, nothing to say', () => {
    const k = compareKinds([kind('M'), batchKind('M2', modules60)], 'voc_v', names, devices);
    expect(k).toMatchObject({ mixed: false, basis: 'as_measured', note: null, per_cell_stats: null });
  });

  it('cells against modules: Voc per cell, with per-cell statistics worked by hand', () => {
    const k = compareKinds([kind('C'), kind('M')], 'voc_v', names, devices);
    expect(k.mixed).toBe(true);
    expect(k.basis).toBe('per_cell');
    expect(k.note).toMatch(/“Incoming cells”: single cells; “Line 2 modules”: 60-cell modules/);
    expect(k.note).toMatch(/Voc adds up over the cells in series, so it is compared per cell/);
    // (40.2 + 40.8 + 39.6) / 3 / 60 = 0.67 V; the cells' mean (0.67 + 0.68 + 0.66) / 3 = 0.67 V.
    expect(k.per_cell_stats!.M!.mean).toBeCloseTo(0.67, 12);
    expect(k.per_cell_stats!.C!.mean).toBeCloseTo(0.67, 12);
    expect(k.per_cell_stats!.M!.max).toBeCloseTo(40.8 / 60, 12);
  });

  it.each(['voc_v', 'vmp_v', 'pmp_w', 'stc_pmp_w', 'rs_ohm', 'rsh_ohm'] as ParamKey[])('%s is put per cell between kinds', (p) => {
    expect(SERIES_KEYS.has(p)).toBe(true);
    expect(compareKinds([kind('M'), kind('L')], p, names, devices).basis).toBe('per_cell');
  });

  it('currents are compared as measured, with the reason they may still differ by design', () => {
    const k = compareKinds([kind('C'), kind('M')], 'isc_a', names, devices);
    expect(k.basis).toBe('as_measured');
    expect(k.note).toMatch(/Isc does not depend on the cells in series, so it is compared as measured; it does depend on the cell size and on strings in parallel/);
  });

  it('FF is compared as measured and says why', () => {
    expect(compareKinds([kind('C'), kind('M')], 'ff', names, devices).note).toMatch(/FF does not depend on the number of cells in series/);
  });

  it('different kinds and a device without a cell count: the t-test on a series figure is refused, in words', () => {
    const k = compareKinds([kind('L'), kind('U')], 'pmp_w', names, devices);
    expect(k.basis).toBe('refused');
    expect(k.note).toMatch(/1 device of “Lot without counts” does not say how many cells are in series: Welch’s t-test is not run on Pmax\. Give the cells in series/);
    // The same batches on FF: no per-cell figure needed, so it is compared.
    expect(compareKinds([kind('L'), kind('U')], 'ff', names, devices).basis).toBe('as_measured');
  });

  it('one batch does not say while the others do: a series figure is refused (the kinds cannot be told apart), FF compared', () => {
    const silent = new Map([...devices, ['S', [dev(null, 40), dev(null, 41)]]]);
    const withOld = new Map([...names, ['S', 'Old lot']]);
    const k = compareKinds([kind('C'), batchKind('S', silent.get('S')!)], 'voc_v', withOld, silent);
    expect(k.mixed).toBe(false);
    expect(k.basis).toBe('refused');
    expect(k.note).toBe(
      '2 devices of “Old lot” do not say how many cells are in series, so it cannot be told whether they are single cells like the rest. Voc adds up over the cells in series: Welch’s t-test is not run on it. Give the cells in series in the files, as the batch’s default before uploading, or in a refit.',
    );
    const ff = compareKinds([kind('C'), batchKind('S', silent.get('S')!)], 'ff', withOld, silent);
    expect(ff.basis).toBe('as_measured');
    expect(ff.note).toMatch(/FF does not add up over the cells in series, so it is compared as measured/);
  });

  it('no batch says: as measured, saying so', () => {
    const none = new Map([['X', [dev(null, 40)]], ['Y', [dev(null, 41)]]]);
    const k = compareKinds([batchKind('X', none.get('X')!), batchKind('Y', none.get('Y')!)], 'voc_v', new Map([['X', 'X'], ['Y', 'Y']]), none);
    expect(k).toMatchObject({ basis: 'as_measured', note: expect.stringMatching(/None of these batches says how many cells/) });
  });

  it('per-cell values leave out devices without a count; the label says per cell', () => {
    expect(perCellValues(unknown, 'voc_v')).toEqual([40.3 / 60]);
    expect(perCellLabel('pmp_w')).toBe('Pmax per cell');
  });
});

describe('severity', () => {
  const f = (...s: string[]) => s.map((severity) => ({ severity }));
  it.each([
    [f(), null, 'pass'],
    [f('info'), null, 'pass'],
    [f('info', 'warn'), null, 'warn'],
    [f('warn', 'fail'), null, 'fail'],
    // With a spec: its verdict decides what fails; flags only warn.
    [f('fail'), 'pass', 'warn'],
    [f('info'), 'pass', 'pass'],
    [f(), 'fail', 'fail'],
    [f('warn'), 'fail', 'fail'],
  ] as const)('flags %j, spec %s → %s', (flags, spec, expected) => {
    expect(deviceSeverity(flags, spec)).toBe(expected);
  });
  it('the flags alone: the worst of them', () => {
    expect(flagSeverity(f('warn', 'info', 'warn'))).toBe('warn');
  });
});
