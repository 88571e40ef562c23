import { fireEvent, render, screen } from '@testing-library/react-native';
import { StyleSheet } from 'react-native';
import type { ReactTestInstance } from 'react-test-renderer';
import { CurveTable } from '@/components/curve-table';
import type { CurvePageRow as CurveRow, FitJson } from '@/lib/api/batches';
import type { Flag, Metrics } from '@/lib/iv/types';
import type { CurveSortKey } from '@/lib/schemas/curves';

// Rows written by hand for this test. The cell's figures are the 57 mm reference cell's
// (reference-data README: Isc 0.76026 A, Voc 0.57278 V, Pmp 0.31070 W; single-diode optimum
// n 1.47727, Rs 0.036547 Ω, Rsh 52.890 Ω); the module's are made up.
const singleFit = (p: { n: number; rs_ohm: number; rsh_ohm: number }): FitJson => ({
  model: 'single-diode', objective: 'true-current', iph_a: 0.760788, i0_a: 3.1068e-7, ...p,
  rmse_a: 7.7301e-4, rmse_true_current_a: 7.7301e-4, max_residual_a: 1.6e-3, residuals_a: [], evaluations: 40,
  converged: true, elapsed_ms: 12, stderr: {}, fit_id: 'f1', conditions: {}, reason: 'upload', created_at: '2025-11-14T08:00:00Z',
});
const failedFit: FitJson = {
  model: 'single-diode', objective: 'true-current', iph_a: null, i0_a: null, n: null, rs_ohm: null, rsh_ohm: null, rmse_a: null, rmse_true_current_a: null,
  max_residual_a: null, residuals_a: [], evaluations: 200, converged: false, elapsed_ms: 30, stderr: {}, message: 'did not converge',
  fit_id: 'f3', conditions: {}, reason: 'upload', created_at: '2025-11-14T08:00:00Z',
};
const metrics = (m: Pick<Metrics, 'isc_a' | 'voc_v' | 'pmp_w' | 'ff'>): Metrics => ({ ...m, imp_a: 0, vmp_v: 0, efficiency: null, rsh0_ohm: null, rs0_ohm: null });
const row = (id: string, device_id: string, m: Metrics, fits: FitJson[], stcPmp_w: number | null, flags: Flag[] = [], severity: CurveRow['severity'] = 'pass', reasons: string[] = []): CurveRow => ({
  id, batch_id: 'b1', device_id, file_name: `${device_id}.csv`, meta: {}, metrics: m, flags, fits, status: 'done', status_reason: null, created_at: '2025-11-14T08:00:00Z', severity, reasons,
  stc: stcPmp_w === null ? null : { method: 'model', from: { irradiance_w_m2: 1000, temp_c: 33 }, isc_a: 0, voc_v: 0, pmp_w: stcPmp_w, imp_a: 0, vmp_v: 0, ff: 0, efficiency: null, notes: [] },
});

const ROWS: CurveRow[] = [
  row('c1', 'CELL-57', metrics({ isc_a: 0.76026, voc_v: 0.57278, pmp_w: 0.3107, ff: 0.71349 }), [singleFit({ n: 1.47727, rs_ohm: 0.036547, rsh_ohm: 52.89 })], 0.32544, [
    { code: 'temperature-assumed', severity: 'info', message: '' },
    { code: 'step-in-curve', severity: 'warn', message: '' },
    { code: 'isc-extrapolated', severity: 'fail', message: '' },
  ], 'fail', ['FF 71.3 % is below the minimum 75.0 %']),
  row('c2', 'MOD-0002', metrics({ isc_a: 9.812, voc_v: 49.374, pmp_w: 381.24, ff: 0.787 }), [singleFit({ n: 1.05, rs_ohm: 0.35, rsh_ohm: 1.2e6 })], null),
  row('c3', 'MOD-0003', metrics({ isc_a: 9.8, voc_v: 49.1, pmp_w: 379.5, ff: 0.7891 }), [failedFit], null, [{ code: 'fit-failed', severity: 'warn', message: '' }], 'warn'),
];

const renderTable = (sort: CurveSortKey = 'device_id', dir: 'asc' | 'desc' = 'asc') => {
  const onSort = jest.fn();
  render(<CurveTable rows={ROWS} sort={sort} dir={dir} onSort={onSort} />);
  return onSort;
};

/** The text of every figure cell of one data row, left to right (after the fixed device column). */
function figureRow(index: number): string[] {
  const table = screen.getByTestId('curve-table');
  // Figure cells are the host Text elements aligned right (the device column and headers are not).
  const isHostText = (n: ReactTestInstance) => (n.type as unknown) === 'Text';
  const texts = table.findAll((n) => isHostText(n) && StyleSheet.flatten(n.props.style)?.textAlign === 'right');
  const perRow = 8; // Isc, Voc, Pmax, FF, n, Rs, Rsh, Pmax STC
  return texts.slice(index * perRow, index * perRow + perRow).map((n) => [n.props.children].flat().join(''));
}

describe('CurveTable', () => {
  it('headers carry the units', () => {
    renderTable();
    const headers = ['Device', 'Isc (A)', 'Voc (V)', 'Pmax (W)', 'FF (%)', 'n', 'Rs (Ω)', 'Rsh (Ω)', 'Pmax at STC (W)', 'Flags'];
    for (const h of headers) expect(screen.getByText(new RegExp(`^${h.replace(/[()]/g, '\\$&')}( [▲▼])?$`))).toBeOnTheScreen();
  });

  it.each([
    // Expected strings worked out by hand from lib/format.ts: 4 significant figures for Isc, Voc,
    // Pmax; FF as % with one decimal; n, Rs, Rsh with 3 significant figures; units only in headers.
    [0, ['0.7603', '0.5728', '0.3107', '71.3', '1.48', '0.0365', '52.9', '0.3254']],
    [1, ['9.812', '49.37', '381.2', '78.7', '1.05', '0.35', '1.20×10⁶', '—']],
    [2, ['9.8', '49.1', '379.5', '78.9', '—', '—', '—', '—']],
  ])('row %i renders its figures with the right precision', (index, cells) => {
    renderTable();
    expect(figureRow(index)).toEqual(cells);
  });

  it('each device is a link to its curve page', () => {
    renderTable();
    for (const r of ROWS) {
      const link = screen.getByTestId(`curve-row-${r.device_id}`);
      expect(link).toHaveTextContent(r.device_id);
      expect(link).toHaveProp('href', `/curves/${r.id}`);
    }
  });

  it('flags: only warn and fail chips are shown (info stays on the curve page)', () => {
    renderTable();
    expect(screen.getByText('step-in-curve')).toBeOnTheScreen();
    expect(screen.getByText('isc-extrapolated')).toBeOnTheScreen();
    expect(screen.queryByText('temperature-assumed')).toBeNull();
  });

  it('the active column shows its direction', () => {
    renderTable('pmp_w', 'desc');
    expect(screen.getByTestId('sort-pmp_w')).toHaveTextContent('Pmax (W) ▼');
    expect(screen.getByTestId('sort-isc_a')).toHaveTextContent('Isc (A)');
  });

  it.each([
    // [current sort, current dir, header pressed, expected onSort call]
    ['device_id', 'asc', 'pmp_w', ['pmp_w', 'asc']],
    ['pmp_w', 'asc', 'pmp_w', ['pmp_w', 'desc']],
    ['pmp_w', 'desc', 'pmp_w', ['pmp_w', 'asc']],
    ['ff', 'desc', 'device_id', ['device_id', 'asc']],
    ['device_id', 'asc', 'rsh_ohm', ['rsh_ohm', 'asc']],
    ['stc_pmp_w', 'asc', 'stc_pmp_w', ['stc_pmp_w', 'desc']],
  ] as const)('sorted by %s %s, pressing %s calls onSort(%j)', (sort, dir, pressed, expected) => {
    const onSort = renderTable(sort, dir);
    fireEvent.press(screen.getByTestId(`sort-${pressed}`));
    expect(onSort).toHaveBeenCalledTimes(1);
    expect(onSort).toHaveBeenCalledWith(...expected);
  });

  it('each device shows its result in a word', () => {
    renderTable();
    expect(screen.getByTestId('result-CELL-57')).toHaveTextContent('Fail');
    expect(screen.getByTestId('result-MOD-0002')).toHaveTextContent('Pass');
    expect(screen.getByTestId('result-MOD-0003')).toHaveTextContent('Warning');
    expect(screen.getByTestId('sort-severity')).toBeDisabled();
  });

  it('the Flags header is not sortable', () => {
    const onSort = renderTable();
    fireEvent.press(screen.getByTestId('sort-flags'));
    expect(onSort).not.toHaveBeenCalled();
    expect(screen.getByTestId('sort-flags')).toBeDisabled();
  });

  it('headers are buttons named for what they sort', () => {
    renderTable();
    expect(screen.getByRole('button', { name: 'Sort by Rs (Ω)' })).toBeOnTheScreen();
  });
});
