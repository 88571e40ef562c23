import { getCoreRowModel, getSortedRowModel, useReactTable } from '@tanstack/react-table';
import type { ColumnDef, SortingState } from '@tanstack/react-table';
import { useVirtualizer } from '@tanstack/react-virtual';
import { useRef } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import type { ViewStyle } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import type { CompareRow } from '@/lib/api/quality';

export const ROW_HEIGHT = 32;

/** CSS the web target understands but React Native's style types do not (sticky cells, 2-D scroll). */
const web = (s: Record<string, unknown>) => s as unknown as ViewStyle;

/**
 * The comparison grid: TanStack Table for columns and sorting, TanStack Virtual so only the rows
 * in view are rendered (10 batches × 1,000 curves scroll like 20), the device column frozen on the
 * left and the header frozen on top.
 */
export function CompareGrid({
  rows,
  columns,
  sorting,
  onSortingChange,
  height,
  onOpen,
}: {
  rows: CompareRow[];
  columns: ColumnDef<CompareRow>[];
  sorting: SortingState;
  onSortingChange: (s: SortingState) => void;
  height: number;
  onOpen: (row: CompareRow) => void;
}) {
  const table = useReactTable({
    data: rows,
    columns,
    state: { sorting },
    onSortingChange: (u) => onSortingChange(typeof u === 'function' ? u(sorting) : u),
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getRowId: (r) => r.curve_id,
  });
  const scrollRef = useRef<View>(null);
  const model = table.getRowModel().rows;
  const virtualizer = useVirtualizer({
    count: model.length,
    getScrollElement: () => scrollRef.current as unknown as HTMLElement | null,
    estimateSize: () => ROW_HEIGHT,
    overscan: 12,
  });
  const headers = table.getHeaderGroups()[0].headers;
  const totalWidth = headers.reduce((s, h) => s + h.getSize(), 0);
  const items = virtualizer.getVirtualItems();

  return (
    <View ref={scrollRef} style={[styles.scroller, { height }, web({ overflow: 'auto' })]} testID="compare-grid">
      <View style={{ width: totalWidth, height: virtualizer.getTotalSize() + ROW_HEIGHT }}>
        <View style={[styles.headRow, { width: totalWidth }, web({ position: 'sticky', top: 0, zIndex: 3 })]}>
          {headers.map((h, k) => {
            const sorted = h.column.getIsSorted();
            return (
              <Pressable
                key={h.id}
                onPress={h.column.getToggleSortingHandler()}
                style={StyleSheet.flatten([styles.cell, styles.head, { width: h.getSize() }, k === 0 ? web({ position: 'sticky', left: 0, zIndex: 4 }) : null])}
                accessibilityRole="button"
                testID={`grid-sort-${h.id}`}
              >
                <Txt variant="label" style={{ fontSize: 12 }} numberOfLines={1}>
                  {String(h.column.columnDef.header)}
                  {sorted === 'asc' ? ' ▲' : sorted === 'desc' ? ' ▼' : ''}
                </Txt>
              </Pressable>
            );
          })}
        </View>
        {items.map((vi) => {
          const row = model[vi.index];
          return (
            <Pressable
              key={row.id}
              onPress={() => onOpen(row.original)}
              style={StyleSheet.flatten([styles.row, { width: totalWidth, transform: [{ translateY: vi.start }] }, web({ position: 'absolute', top: ROW_HEIGHT, left: 0 })])}
              testID={`grid-row-${row.original.device_id}`}
            >
              {row.getVisibleCells().map((cell, k) => {
                const def = cell.column.columnDef.cell;
                const text = typeof def === 'function' ? String(def(cell.getContext()) ?? '') : String(cell.getValue() ?? '');
                const fail = cell.column.id === 'result' && text === 'fail';
                return (
                  <View
                    key={cell.id}
                    style={[styles.cell, { width: cell.column.getSize() }, k === 0 ? [styles.frozen, web({ position: 'sticky', left: 0, zIndex: 2 })] : null]}
                  >
                    <Txt
                      variant={k === 0 ? 'figure' : 'figure'}
                      numberOfLines={1}
                      style={[{ fontSize: 12.5, textAlign: k < 2 || cell.column.id === 'flags' || cell.column.id === 'result' ? 'left' : 'right' }, k === 0 && { color: theme.color.electron }, fail && { color: theme.color.danger }]}
                    >
                      {text}
                    </Txt>
                  </View>
                );
              })}
            </Pressable>
          );
        })}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  scroller: { borderWidth: 1, borderColor: theme.color.line, borderRadius: theme.radius.m, backgroundColor: theme.color.surface },
  headRow: { flexDirection: 'row', height: ROW_HEIGHT, backgroundColor: theme.color.sunken },
  head: { backgroundColor: theme.color.sunken, borderBottomWidth: 1, borderBottomColor: theme.color.line },
  row: { flexDirection: 'row', height: ROW_HEIGHT, borderBottomWidth: 1, borderBottomColor: theme.color.sunken, backgroundColor: theme.color.surface },
  cell: { height: ROW_HEIGHT, paddingHorizontal: 8, justifyContent: 'center' },
  frozen: { backgroundColor: theme.color.surface, borderRightWidth: 1, borderRightColor: theme.color.line },
});
