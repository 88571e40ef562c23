/**
 * The comparison on a phone: one figure at a time, one card per batch with its kind, statistics
 * and Welch's answer; between cells and modules the figures are per cell. The batches and devices
 * are invented for this test; per-cell values are checked by hand (40.2 V / 60 = 0.67 V).
 */
import { fireEvent, render, screen, within } from '@testing-library/react-native';
import { CompareByParameter, shownLabel, shownStats, shownValues } from '@/components/compare-by-parameter';
import { comparisonOfWire } from '@/lib/api/quality';
import type { ComparisonWire } from '@/lib/api/quality';
import { batchKind, compareKinds } from '@/lib/quality/compare-kinds';
import { columnsOfRows } from '@/lib/quality/compare-table';
import { describe as describeValues } from '@/lib/quality/describe';
import type { ParamKey } from '@/lib/quality/params';

jest.mock('@/components/distribution-chart', () => ({ DistributionChart: () => null }));

const CELLS = { id: 'b-c', name: 'Incoming cells, lot A-1187 from the supplier with a long name' };
const MODS = { id: 'b-m', name: 'Line 2 modules' };
const cellRows = [0.67, 0.68, 0.66].map((v, k) => ({ curve_id: `c${k}`, device_id: `C-${k}`, cells: 1, values: { voc_v: v, ff: 0.8 }, flags: [], result: null, reasons: [], power_class: null }));
const modRows = [40.2, 40.8, 39.6].map((v, k) => ({ curve_id: `m${k}`, device_id: `M-${k}`, cells: 60, values: { voc_v: v, ff: 0.78 }, flags: [], result: null, reasons: [], power_class: null }));

function wire(param: ParamKey): ComparisonWire {
  const devices = new Map([[CELLS.id, cellRows], [MODS.id, modRows]]);
  const kinds = compareKinds([batchKind(CELLS.id, cellRows), batchKind(MODS.id, modRows)], param, new Map([[CELLS.id, CELLS.name], [MODS.id, MODS.name]]), devices);
  const stats = (rows: typeof cellRows) => ({ [param]: describeValues(rows.map((r) => (r.values as Record<string, number>)[param])) });
  return {
    batches: [{ ...CELLS, state: 'open', count: 3 }, { ...MODS, state: 'open', count: 3 }],
    spec: null,
    param,
    stats: { [CELLS.id]: stats(cellRows), [MODS.id]: stats(modRows) },
    counts: { [CELLS.id]: null, [MODS.id]: null },
    differences: [{ batch_a: CELLS.id, batch_b: MODS.id, param, basis: kinds.basis, sentence: 'Invented sentence for the test.' }],
    tables: [columnsOfRows(cellRows), columnsOfRows(modRows)],
    outliers: [[null, null, null], [null, null, null]],
    kinds,
  };
}

describe('per-cell figures between kinds', () => {
  it('Voc per cell: values ÷ cells in series, statistics per cell', () => {
    const c = comparisonOfWire(wire('voc_v'));
    expect(shownLabel(c, 'voc_v')).toBe('Voc per cell');
    const v = shownValues(c, MODS.id, 'voc_v');
    expect(v[0]).toBeCloseTo(0.67, 12);
    expect(shownStats(c, MODS.id, 'voc_v')!.mean).toBeCloseTo(0.67, 12);
    expect(shownValues(c, CELLS.id, 'voc_v')).toEqual([0.67, 0.68, 0.66]);
  });

  it('FF as measured, shown in %', () => {
    const c = comparisonOfWire(wire('ff'));
    expect(shownLabel(c, 'ff')).toBe('FF');
    expect(shownValues(c, MODS.id, 'ff')[0]).toBeCloseTo(78, 10);
    expect(shownStats(c, MODS.id, 'ff')!.mean).toBeCloseTo(0.78, 12);
  });
});

describe('CompareByParameter', () => {
  it('one card per batch with its kind, its statistics of the figure and the t-test answer; the kinds in words', () => {
    render(<CompareByParameter c={comparisonOfWire(wire('voc_v'))} param="voc_v" setParam={jest.fn()} />);
    expect(screen.getByTestId('kinds-note')).toHaveTextContent(/compared per cell/);
    const cells = within(screen.getByTestId(`compare-batch-${CELLS.name}`));
    expect(cells.getByText(/single cells · 3 curves/)).toBeOnTheScreen();
    expect(cells.getByText('Voc per cell mean')).toBeOnTheScreen();
    // Mean and median of 0.67, 0.68, 0.66 V are both 0.67 V.
    expect(cells.getAllByText('0.67 V')).toHaveLength(2);
    const mods = within(screen.getByTestId(`compare-batch-${MODS.name}`));
    expect(mods.getByText(/60-cell modules · 3 curves/)).toBeOnTheScreen();
    // Median per cell: 40.2 / 60 = 0.67 V; range 39.6/60 = 0.66 … 40.8/60 = 0.68 V.
    expect(mods.getAllByText('0.67 V')).toHaveLength(2);
    expect(mods.getByText('0.66 … 0.68 V')).toBeOnTheScreen();
    expect(screen.getByTestId(`difference-${MODS.name}`)).toHaveTextContent('Invented sentence for the test.');
  });

  it('a refused t-test says why', () => {
    const w = wire('voc_v');
    w.differences = [{ batch_a: CELLS.id, batch_b: MODS.id, param: 'voc_v', basis: 'refused', error: 'these batches hold different kinds' }];
    render(<CompareByParameter c={comparisonOfWire(w)} param="voc_v" setParam={jest.fn()} />);
    expect(screen.getByTestId(`difference-${MODS.name}`)).toHaveTextContent('No t-test: these batches hold different kinds');
  });

  it('the figure picker names the figures and chooses one', () => {
    const setParam = jest.fn();
    render(<CompareByParameter c={comparisonOfWire(wire('voc_v'))} param="voc_v" setParam={setParam} />);
    expect(screen.getByTestId('param-voc_v')).toBeChecked();
    expect(screen.getByTestId('param-ff')).not.toBeChecked();
    expect(screen.getByTestId('param-rs_ohm')).toHaveTextContent('Rs');
    fireEvent.press(screen.getByTestId('param-ff'));
    expect(setParam).toHaveBeenCalledWith('ff');
  });
});
