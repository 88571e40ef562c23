import { Link } from 'expo-router';
import { createColumnHelper, getCoreRowModel, useReactTable } from '@tanstack/react-table';
import type { CellContext } from '@tanstack/react-table';
import type { SortingState } from '@tanstack/react-table';
import { Pressable, ScrollView, StyleSheet, View } from 'react-native';
import { FlagChip } from '@/components/flag-chip';
import { SeverityBadge } from '@/components/severity-badge';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import type { CurvePageRow as CurveRow } from '@/lib/api/batches';
import { formatNumber, labelWithUnit } from '@/lib/format';
import { stcFiguresOf } from '@/lib/schemas/curves';
import type { CurveSortKey } from '@/lib/schemas/curves';

const col = createColumnHelper<CurveRow>();

/** Our cell definitions are formatters returning text (numbers render as <Text>, not DOM). */
function cellText(def: unknown, ctx: CellContext<CurveRow, unknown>): string {
  return typeof def === 'function' ? String(def(ctx) ?? '') : String(ctx.getValue() ?? '');
}
const single = (r: CurveRow) => r.fits.find((f) => f.model === 'single-diode');

/** Columns of the batch table; ids are the server's sort keys. Headers and digits from the key table (the unit in the header, the number alone in the cell). */
const COLUMNS = [
  col.accessor('device_id', { id: 'device_id', header: 'Device', size: 150 }),
  col.display({ id: 'severity', header: 'Result', size: 92 }),
  col.accessor((r) => r.metrics.isc_a, { id: 'isc_a', header: labelWithUnit('isc_a'), size: 86, cell: (c) => formatNumber('isc_a', c.getValue()) }),
  col.accessor((r) => r.metrics.voc_v, { id: 'voc_v', header: labelWithUnit('voc_v'), size: 86, cell: (c) => formatNumber('voc_v', c.getValue()) }),
  col.accessor((r) => r.metrics.pmp_w, { id: 'pmp_w', header: labelWithUnit('pmp_w'), size: 90, cell: (c) => formatNumber('pmp_w', c.getValue()) }),
  col.accessor((r) => r.metrics.ff, { id: 'ff', header: labelWithUnit('ff'), size: 70, cell: (c) => formatNumber('ff', c.getValue()) }),
  col.accessor((r) => single(r)?.n ?? null, { id: 'n', header: labelWithUnit('n'), size: 64, cell: (c) => formatNumber('n', c.getValue(), 3) }),
  col.accessor((r) => single(r)?.rs_ohm ?? null, { id: 'rs_ohm', header: labelWithUnit('rs_ohm'), size: 84, cell: (c) => formatNumber('rs_ohm', c.getValue(), 3) }),
  col.accessor((r) => single(r)?.rsh_ohm ?? null, { id: 'rsh_ohm', header: labelWithUnit('rsh_ohm'), size: 90, cell: (c) => formatNumber('rsh_ohm', c.getValue(), 3) }),
  col.accessor((r) => stcFiguresOf(r.stc)?.pmp_w ?? null, { id: 'stc_pmp_w', header: labelWithUnit('stc_pmp_w'), size: 124, cell: (c) => formatNumber('stc_pmp_w', c.getValue()) }),
  col.display({ id: 'flags', header: 'Flags', size: 210 }),
];

/**
 * The batch's curves as a table, for wide screens (phones get CurveCards): sorting happens on the server (the table library only manages headers and
 * state), so 5,000 curves page as fast as 50. The device column stays put while the figures scroll.
 */
export function CurveTable({ rows, sort, dir, onSort }: { rows: CurveRow[]; sort: CurveSortKey; dir: 'asc' | 'desc'; onSort: (key: CurveSortKey, dir: 'asc' | 'desc') => void }) {
  const sorting: SortingState = [{ id: sort, desc: dir === 'desc' }];
  const table = useReactTable({
    data: rows,
    columns: COLUMNS,
    state: { sorting },
    manualSorting: true,
    getCoreRowModel: getCoreRowModel(),
    getRowId: (r) => r.id,
  });
  const [deviceCol, ...rest] = table.getAllLeafColumns();
  const header = (id: string, label: string, width: number) => {
    const sortable = id !== 'flags' && id !== 'severity';
    const active = sort === id;
    return (
      <Pressable
        key={id}
        disabled={!sortable}
        onPress={() => onSort(id as CurveSortKey, active && dir === 'asc' ? 'desc' : 'asc')}
        style={[styles.cell, styles.head, { width }]}
        accessibilityRole="button"
        accessibilityLabel={`Sort by ${label}`}
        testID={`sort-${id}`}
      >
        <Txt variant="label" style={{ fontSize: 12 }} numberOfLines={1}>
          {label}
          {active ? (dir === 'asc' ? ' ▲' : ' ▼') : ''}
        </Txt>
      </Pressable>
    );
  };
  return (
    <View style={styles.wrap} testID="curve-table">
      <View style={{ width: deviceCol.getSize() }}>
        {header(deviceCol.id, String(deviceCol.columnDef.header), deviceCol.getSize())}
        {table.getRowModel().rows.map((r) => (
          <Link key={r.id} href={`/curves/${r.original.id}`} asChild>
            <Pressable style={StyleSheet.flatten([styles.cell, styles.row, { width: deviceCol.getSize() }])} testID={`curve-row-${r.original.device_id}`}>
              <Txt variant="figure" numberOfLines={1} style={{ color: theme.color.electron, fontSize: 13 }}>
                {r.original.device_id}
              </Txt>
            </Pressable>
          </Link>
        ))}
      </View>
      <ScrollView horizontal style={{ flex: 1 }} contentContainerStyle={{ flexDirection: 'column' }}>
        <View style={{ flexDirection: 'row' }}>{rest.map((c) => header(c.id, String(c.columnDef.header), c.getSize()))}</View>
        {table.getRowModel().rows.map((r) => (
          <View key={r.id} style={{ flexDirection: 'row' }}>
            {r.getVisibleCells().slice(1).map((cell) =>
              cell.column.id === 'severity' ? (
                <View key={cell.id} style={[styles.cell, styles.row, { width: cell.column.getSize() }]}>
                  <SeverityBadge severity={r.original.severity} testID={`result-${r.original.device_id}`} />
                </View>
              ) : cell.column.id === 'flags' ? (
                <View key={cell.id} style={[styles.cell, styles.row, { width: cell.column.getSize(), flexDirection: 'row', gap: 4, flexWrap: 'nowrap', overflow: 'hidden' }]}>
                  {r.original.flags.filter((f) => f.severity !== 'info').slice(0, 3).map((f) => (
                    <FlagChip key={f.code} flag={f} />
                  ))}
                </View>
              ) : (
                <View key={cell.id} style={[styles.cell, styles.row, { width: cell.column.getSize() }]}>
                  <Txt variant="figure" style={{ fontSize: 13, textAlign: 'right' }} numberOfLines={1}>
                    {cellText(cell.column.columnDef.cell, cell.getContext())}
                  </Txt>
                </View>
              ),
            )}
          </View>
        ))}
      </ScrollView>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { flexDirection: 'row', borderWidth: 1, borderColor: theme.color.line, borderRadius: theme.radius.m, overflow: 'hidden', backgroundColor: theme.color.surface },
  cell: { paddingHorizontal: 8, height: 36, justifyContent: 'center' },
  head: { backgroundColor: theme.color.sunken, borderBottomWidth: 1, borderBottomColor: theme.color.line },
  row: { borderBottomWidth: 1, borderBottomColor: theme.color.sunken },
});
