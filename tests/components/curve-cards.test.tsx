/**
 * The batch's devices as cards (phones): each card names the device, says its result in a word,
 * shows Pmax, FF, Voc and Isc with units, the flags that ask for a look and the spec's first
 * reason; it links to the curve page; the sort choices stand in for the table's headers.
 */
import { fireEvent, render, screen, within } from '@testing-library/react-native';
import { CurveCards } from '@/components/curve-cards';
import type { CurvePageRow } from '@/lib/api/batches';
import type { Flag, Metrics } from '@/lib/iv/types';

// Rows written by hand for this test: the cell's figures are the 57 mm reference cell's
// (reference-data README: Isc 0.76026 A, Voc 0.57278 V, Pmp 0.31070 W); the module's are invented.
const metrics = (m: Pick<Metrics, 'isc_a' | 'voc_v' | 'pmp_w' | 'ff'>): Metrics => ({ ...m, imp_a: 0, vmp_v: 0, efficiency: null, rsh0_ohm: null, rs0_ohm: null });
const row = (id: string, device_id: string, m: Metrics, severity: CurvePageRow['severity'], flags: Flag[] = [], reasons: string[] = []): CurvePageRow => ({
  id, batch_id: 'b1', device_id, file_name: `${device_id}.csv`, meta: {}, metrics: m, flags, fits: [], stc: null, status: 'done', status_reason: null, created_at: '2025-11-14T08:00:00Z', severity, reasons,
});
const ROWS: CurvePageRow[] = [
  row('c1', 'CELL-57', metrics({ isc_a: 0.76026, voc_v: 0.57278, pmp_w: 0.3107, ff: 0.71349 }), 'fail', [
    { code: 'temperature-assumed', severity: 'info', message: '' },
    { code: 'step', severity: 'fail', message: '' },
  ], ['FF 71.3 % is below the minimum 75.0 %', 'Pmax 0.3107 W is below the minimum 0.32 W']),
  row('c2', 'MOD-0002', metrics({ isc_a: 9.812, voc_v: 49.374, pmp_w: 381.24, ff: 0.787 }), 'pass'),
  row('c3', 'MOD-0003-with-a-very-long-device-identifier-from-the-line', metrics({ isc_a: 9.8, voc_v: 49.1, pmp_w: 379.5, ff: 0.7891 }), 'warn', [{ code: 'noisy', severity: 'warn', message: '' }]),
];

describe('CurveCards', () => {
  it('one card per device, linking to its curve page, with its result in a word', () => {
    render(<CurveCards rows={ROWS} sort="device_id" dir="asc" onSort={jest.fn()} />);
    for (const r of ROWS) {
      const card = screen.getByTestId(`curve-row-${r.device_id}`);
      expect(card).toHaveProp('href', `/curves/${r.id}`);
      expect(card).toHaveTextContent(new RegExp(r.device_id));
    }
    expect(screen.getByTestId('result-CELL-57')).toHaveTextContent('Fail');
    expect(screen.getByTestId('result-MOD-0002')).toHaveTextContent('Pass');
    expect(screen.getByTestId(`result-${ROWS[2].device_id}`)).toHaveTextContent('Warning');
  });

  it('shows Pmax, FF, Voc and Isc with their units (digits from the key table, worked by hand)', () => {
    render(<CurveCards rows={ROWS} sort="device_id" dir="asc" onSort={jest.fn()} />);
    const card = within(screen.getByTestId('curve-row-CELL-57'));
    for (const text of ['0.3107 W', '71.3 %', '0.5728 V', '0.7603 A']) expect(card.getByText(text)).toBeOnTheScreen();
    const mod = within(screen.getByTestId('curve-row-MOD-0002'));
    for (const text of ['381.2 W', '78.7 %', '49.37 V', '9.812 A']) expect(mod.getByText(text)).toBeOnTheScreen();
  });

  it('warn and fail flags as chips (info stays on the curve page); the first reason and how many more', () => {
    render(<CurveCards rows={ROWS} sort="device_id" dir="asc" onSort={jest.fn()} />);
    const card = within(screen.getByTestId('curve-row-CELL-57'));
    expect(card.getByText('step')).toBeOnTheScreen();
    expect(card.queryByText('temperature-assumed')).toBeNull();
    expect(card.getByText(/FF 71\.3 % is below the minimum 75\.0 % \(and 1 more\)/)).toBeOnTheScreen();
    expect(within(screen.getByTestId('curve-row-MOD-0002')).queryByText(/below/)).toBeNull();
  });

  it.each([
    // [current sort, current dir, choice pressed, expected onSort call]
    ['device_id', 'asc', 'pmp_w', ['pmp_w', 'asc']],
    ['pmp_w', 'asc', 'pmp_w', ['pmp_w', 'desc']],
    ['pmp_w', 'desc', 'pmp_w', ['pmp_w', 'asc']],
    ['ff', 'asc', 'device_id', ['device_id', 'asc']],
  ] as const)('sorted by %s %s, pressing %s calls onSort(%j)', (sort, dir, pressed, expected) => {
    const onSort = jest.fn();
    render(<CurveCards rows={ROWS} sort={sort} dir={dir} onSort={onSort} />);
    fireEvent.press(screen.getByTestId(`card-sort-${pressed}`));
    expect(onSort).toHaveBeenCalledWith(...expected);
  });

  it('the chosen order shows its direction', () => {
    render(<CurveCards rows={ROWS} sort="ff" dir="desc" onSort={jest.fn()} />);
    expect(screen.getByTestId('card-sort-ff')).toHaveTextContent('FF ▼');
    expect(screen.getByTestId('card-sort-ff')).toBeChecked();
    expect(screen.getByTestId('card-sort-pmp_w')).not.toBeChecked();
    expect(screen.getByTestId('card-sort-pmp_w')).toHaveTextContent('Pmax');
  });
});
