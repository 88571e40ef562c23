import type { ColumnDef, SortingState } from '@tanstack/react-table';
import { useLocalSearchParams, useRouter } from 'expo-router';
import { useMemo, useState } from 'react';
import { Pressable, StyleSheet, TextInput, View, useWindowDimensions } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { CautionBlock } from '@/components/caution-block';
import { CompareByParameter, shownLabel, shownStats, shownValues } from '@/components/compare-by-parameter';
import { CompareGrid } from '@/components/compare-grid';
import { DistributionChart } from '@/components/lazy-charts';
import { QueryState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { useBatches } from '@/lib/api/batches';
import { useComparison, useSpecs } from '@/lib/api/quality';
import { vocSplitSentence } from '@/lib/quality/voc-split-rows';
import type { CompareRow, Comparison } from '@/lib/api/quality';
import { ALL_COLUMNS, DEFAULT_COLUMNS, GRID_PARAMS, columnHeader } from '@/lib/compare-columns';
import type { CompareColumnId } from '@/lib/compare-columns';
import { downloadText } from '@/lib/download';
import { PARAM_LABELS, fmtParam, formatNumberAgainst, sig, unitOf } from '@/lib/format';
import { comparisonCsv, comparisonFileName } from '@/lib/quality/compare-csv';
import { isParamKey } from '@/lib/quality/params';
import { uncertaintyKey, valuePlusMinus } from '@/lib/quality/uncertainty';
import type { ParamKey } from '@/lib/quality/params';

/** The spec's limits of each parameter, as the bounds a cell is told apart from. */
type LimitBounds = Partial<Record<string, number[]>>;

function cellText(id: CompareColumnId, r: CompareRow, bounds: LimitBounds): string {
  const v = r[id];
  if (id === 'flags') return (r.flags ?? []).join(' ');
  if (id === 'reasons') return (r.reasons ?? []).join('; ');
  if (id === 'outlier') return r.outlier == null ? '' : r.outlier ? 'yes' : '';
  // Pmax, Isc, Voc and STC Pmax with their expanded uncertainty (k = 2) when the batch has a setup.
  const u = isParamKey(id) && uncertaintyKey(id) ? r[uncertaintyKey(id)!] : null;
  if (typeof v === 'number' && typeof u === 'number' && u > 0) return valuePlusMinus(v, u);
  // The number alone (the header has the unit), with the digits that tell it from a limit of the
  // spec: a Voc of 42.0011 V failing a 42 V maximum reads 42.001, not 42.
  if (typeof v === 'number') return formatNumberAgainst(id, v, bounds[id] ?? []);
  return v == null ? '' : String(v);
}

function columnDefs(ids: CompareColumnId[], bounds: LimitBounds): ColumnDef<CompareRow>[] {
  return ids.map((id) => ({
    id,
    header: columnHeader(id),
    accessorFn: (r: CompareRow) => (r[id] as unknown) ?? null,
    cell: (ctx) => cellText(id, ctx.row.original, bounds),
    size: id === 'device_id' ? 130 : id === 'batch_name' ? 170 : id === 'flags' || id === 'reasons' ? 220 : id === 'result' || id === 'outlier' ? 80 : id === 'i0_a' || id === 'j0_a_cm2' || id === 'rmse_a' || (isParamKey(id) && uncertaintyKey(id)) ? 124 : 96,
    sortUndefined: 'last',
  }));
}

/** The comparison's address: /compare?batches=<id>,<id>&param=rs_ohm&spec=<spec id>. */
type CompareParams = { batches?: string | string[]; param?: string | string[]; spec?: string | string[] };

/** A search param given twice arrives as an array: the first one counts. */
const first = (v: string | string[] | undefined): string => (Array.isArray(v) ? (v[0] ?? '') : (v ?? ''));

function Chip({ on, label, onPress, testID }: { on: boolean; label: string; onPress: () => void; testID?: string }) {
  return (
    <Pressable onPress={onPress} style={[styles.chip, on && styles.chipOn]} accessibilityRole="checkbox" aria-checked={on} testID={testID}>
      <Txt variant="caption" style={{ color: on ? '#fff' : theme.color.inkSoft }} numberOfLines={1}>{label}</Txt>
    </Pressable>
  );
}

export default function CompareScreen() {
  const batches = useBatches();
  const specs = useSpecs();
  const router = useRouter();
  const { width, height } = useWindowDimensions();
  const wide = width >= theme.wideFrom;
  // Phones and narrow windows: one figure at a time for every batch; wider screens: the grid.
  const asGrid = width >= theme.tableFrom;
  // The chosen batches, parameter and spec live in the address, so a comparison can be linked and
  // reloaded; the filters, sorting and columns are a view of it and stay local.
  const search = useLocalSearchParams<CompareParams>();
  const batchesParam = first(search.batches);
  const selected = useMemo(() => batchesParam.split(',').filter(Boolean), [batchesParam]);
  const specId = first(search.spec);
  const paramParam = first(search.param);
  const param: ParamKey = isParamKey(paramParam) && GRID_PARAMS.includes(paramParam) ? paramParam : 'pmp_w';
  const setSelected = (next: string[]) => router.setParams({ batches: next.length ? next.join(',') : undefined });
  const setSpecId = (id: string) => router.setParams({ spec: id || undefined });
  const setParam = (p: ParamKey) => router.setParams({ param: p });
  const [columns, setColumns] = useState<CompareColumnId[]>(DEFAULT_COLUMNS);
  const [choosing, setChoosing] = useState(false);
  const [sorting, setSorting] = useState<SortingState>([]);
  const [onlyBatches, setOnlyBatches] = useState<string[]>([]);
  const [result, setResult] = useState<'all' | 'pass' | 'fail'>('all');
  const [flag, setFlag] = useState('');
  const [range, setRange] = useState({ min: '', max: '' });
  const comparison = useComparison(selected, specId, param);

  const toggle = (list: string[], id: string) => (list.includes(id) ? list.filter((x) => x !== id) : [...list, id]);
  const move = (id: CompareColumnId, by: number) =>
    setColumns((cols) => {
      const k = cols.indexOf(id);
      const j = k + by;
      if (k < 1 || j < 1 || j >= cols.length) return cols; // the device column stays first
      const next = [...cols];
      [next[k], next[j]] = [next[j], next[k]];
      return next;
    });

  return (
    <Screen title="Compare batches" subtitle="Pick two or more batches: every curve in one grid, their statistics side by side, and whether a difference is real." testID="compare-screen" maxWidth={1800}>
      <Card title="What to compare">
        <QueryState query={batches} isEmpty={(d) => d.batches.length === 0} empty="No batches yet.">
          {(d) => (
            <View style={styles.chips}>
              {d.batches.filter((b) => !b.archived).map((b) => (
                <Chip key={b.id} on={selected.includes(b.id)} label={`${b.name} (${b.curve_count ?? 0})`} onPress={() => setSelected(toggle(selected, b.id))} testID={`pick-${b.name}`} />
              ))}
            </View>
          )}
        </QueryState>
        <View style={{ gap: 4 }}>
          <Txt variant="label">Judge against (optional)</Txt>
          <View style={styles.chips}>
            <Chip on={!specId} label="No spec" onPress={() => setSpecId('')} />
            {(specs.data?.specs ?? []).map((s) => (
              <Chip key={s.id} on={specId === s.id} label={`${s.name} v${s.version}`} onPress={() => setSpecId(s.id)} testID={`compare-spec-${s.name}`} />
            ))}
          </View>
        </View>
      </Card>

      {selected.length === 0 ? (
        <Txt variant="body">Choose batches above to compare them.</Txt>
      ) : (
        <QueryState query={comparison}>
          {(c) => (
            <CompareBody
              c={c}
              wide={wide}
              asGrid={asGrid}
              gridHeight={Math.max(320, Math.min(620, height - 260))}
              param={param}
              setParam={setParam}
              columns={columns}
              setColumns={setColumns}
              choosing={choosing}
              setChoosing={setChoosing}
              move={move}
              sorting={sorting}
              setSorting={setSorting}
              filters={{ onlyBatches, setOnlyBatches, result, setResult, flag, setFlag, range, setRange }}
              onOpen={(r) => router.push(`/curves/${r.curve_id}`)}
              limits={(specs.data?.specs ?? []).find((s) => s.id === specId)?.limits}
            />
          )}
        </QueryState>
      )}
    </Screen>
  );
}

type Filters = {
  onlyBatches: string[];
  setOnlyBatches: (v: string[]) => void;
  result: 'all' | 'pass' | 'fail';
  setResult: (v: 'all' | 'pass' | 'fail') => void;
  flag: string;
  setFlag: (v: string) => void;
  range: { min: string; max: string };
  setRange: (v: { min: string; max: string }) => void;
};

function CompareBody(props: {
  c: Comparison;
  wide: boolean;
  asGrid: boolean;
  gridHeight: number;
  param: ParamKey;
  setParam: (p: ParamKey) => void;
  columns: CompareColumnId[];
  setColumns: (f: (c: CompareColumnId[]) => CompareColumnId[]) => void;
  choosing: boolean;
  setChoosing: (v: boolean) => void;
  move: (id: CompareColumnId, by: number) => void;
  sorting: SortingState;
  setSorting: (s: SortingState) => void;
  filters: Filters;
  onOpen: (r: CompareRow) => void;
  /** The chosen spec's limits: a cell near one gets the digits to tell it apart. */
  limits?: Partial<Record<string, { min?: number; max?: number }>>;
}) {
  const { c, wide, asGrid, param, setParam, columns, setColumns, filters: f } = props;
  const [showCurves, setShowCurves] = useState(false);
  const flagsPresent = useMemo(() => [...new Set(c.rows.flatMap((r) => r.flags))].sort(), [c.rows]);
  const filtered = useMemo(() => {
    const lo = f.range.min.trim() ? Number(f.range.min.replace(',', '.')) : null;
    const hi = f.range.max.trim() ? Number(f.range.max.replace(',', '.')) : null;
    const scale = param === 'ff' || param === 'efficiency' ? 0.01 : 1; // the range is typed as shown (%)
    return c.rows.filter((r) => {
      if (f.onlyBatches.length && !f.onlyBatches.includes(r.batch_id)) return false;
      if (f.result !== 'all' && r.result !== f.result) return false;
      if (f.flag && !r.flags.includes(f.flag)) return false;
      const v = r[param] as number | null;
      if (lo != null && Number.isFinite(lo) && !(v != null && v >= lo * scale)) return false;
      if (hi != null && Number.isFinite(hi) && !(v != null && v <= hi * scale)) return false;
      return true;
    });
  }, [c.rows, f.onlyBatches, f.result, f.flag, f.range, param]);
  const limits = props.limits;
  const bounds = useMemo<LimitBounds>(
    () => Object.fromEntries(Object.entries(limits ?? {}).map(([k, l]) => [k, [l?.min, l?.max].filter((x): x is number => typeof x === 'number')])),
    [limits],
  );
  const defs = useMemo(() => columnDefs(columns, bounds), [columns, bounds]);

  const exportView = () => {
    const order = props.sorting[0];
    const rows = [...filtered];
    if (order) {
      rows.sort((a, b) => {
        const x = a[order.id] as number | string | null;
        const y = b[order.id] as number | string | null;
        if (x == null) return 1;
        if (y == null) return -1;
        return (x < y ? -1 : x > y ? 1 : 0) * (order.desc ? -1 : 1);
      });
    }
    // One row per device shown, the columns shown (units in their names, FF and efficiency in %),
    // batch, spec, release state and export time on each row (lib/quality/compare-csv.ts).
    const exportedAt = new Date();
    downloadText(comparisonFileName(exportedAt), comparisonCsv({ rows, columns, batches: c.batches, spec: c.spec, exportedAt }));
  };

  const statRows: [string, (s: NonNullable<Comparison['stats'][string][string]>) => string][] = [
    ['n', (s) => String(s.n)],
    ['mean', (s) => fmtParam(param, s.mean)],
    ['σ', (s) => fmtParam(param, s.sd, 3)],
    ['min', (s) => fmtParam(param, s.min)],
    ['P5', (s) => fmtParam(param, s.p5)],
    ['median', (s) => fmtParam(param, s.median)],
    ['P95', (s) => fmtParam(param, s.p95)],
    ['max', (s) => fmtParam(param, s.max)],
    ['Cpk', (s) => (s.cpk == null ? '—' : sig(s.cpk, 3))],
  ];

  return (
    <>
      {/* The comparison's CSV is downloaded here: the high-voltage caution goes with it on the screen, not in the file. */}
      <CautionBlock />
      {asGrid ? null : <CompareByParameter c={c} param={param} setParam={setParam} />}
      {!asGrid && !showCurves ? (
        <Card title="Every curve">
          <Txt variant="caption">The grid of all {c.rows.length} curves, with filters, sorting and the CSV download, scrolls sideways on a phone.</Txt>
          <Button label={`Show all ${c.rows.length} curves`} kind="secondary" onPress={() => setShowCurves(true)} testID="show-grid" />
        </Card>
      ) : (
      <Card title={`${filtered.length} of ${c.rows.length} curves`}>
        <View style={{ gap: 8 }}>
          <View style={styles.chips}>
            {c.batches.map((b) => (
              <Chip key={b.id} on={f.onlyBatches.includes(b.id)} label={`only ${b.name}`} onPress={() => f.setOnlyBatches(f.onlyBatches.includes(b.id) ? f.onlyBatches.filter((x) => x !== b.id) : [...f.onlyBatches, b.id])} />
            ))}
            {c.spec ? (['all', 'pass', 'fail'] as const).map((x) => <Chip key={x} on={f.result === x} label={x === 'all' ? 'pass and fail' : `${x} only`} onPress={() => f.setResult(x)} testID={`filter-${x}`} />) : null}
            {flagsPresent.map((x) => (
              <Chip key={x} on={f.flag === x} label={`flag ${x}`} onPress={() => f.setFlag(f.flag === x ? '' : x)} />
            ))}
          </View>
          <View style={[styles.chips, { alignItems: 'center' }]}>
            <Txt variant="label">{PARAM_LABELS[param]} between</Txt>
            <TextInput value={f.range.min} onChangeText={(t) => f.setRange({ ...f.range, min: t })} placeholder="min" placeholderTextColor={theme.color.muted} style={styles.num} keyboardType="numeric" accessibilityLabel="Range minimum" />
            <Txt variant="label">and</Txt>
            <TextInput value={f.range.max} onChangeText={(t) => f.setRange({ ...f.range, max: t })} placeholder="max" placeholderTextColor={theme.color.muted} style={styles.num} keyboardType="numeric" accessibilityLabel="Range maximum" />
            <Txt variant="caption">{unitOf(param)}</Txt>
            <View style={{ flexGrow: 1 }} />
            <Button label={props.choosing ? 'Done with columns' : 'Columns…'} kind="secondary" onPress={() => props.setChoosing(!props.choosing)} testID="choose-columns" />
            <Button label="Download this view (CSV)" kind="secondary" onPress={exportView} testID="download-view" />
          </View>
          {props.choosing ? (
            <View style={styles.chooser} testID="column-chooser">
              {ALL_COLUMNS.filter((id) => id !== 'device_id').map((id) => {
                const on = columns.includes(id);
                return (
                  <View key={id} style={styles.chooseRow}>
                    <Chip on={on} label={columnHeader(id)} onPress={() => setColumns((cols) => (on ? cols.filter((x) => x !== id) : [...cols, id]))} testID={`col-${id}`} />
                    {on ? (
                      <>
                        <Pressable onPress={() => props.move(id, -1)} accessibilityLabel={`Move ${columnHeader(id)} left`}><Txt variant="label">◀</Txt></Pressable>
                        <Pressable onPress={() => props.move(id, 1)} accessibilityLabel={`Move ${columnHeader(id)} right`}><Txt variant="label">▶</Txt></Pressable>
                      </>
                    ) : null}
                  </View>
                );
              })}
            </View>
          ) : null}
          <CompareGrid rows={filtered} columns={defs} sorting={props.sorting} onSortingChange={props.setSorting} height={props.gridHeight} onOpen={props.onOpen} />
          <Txt variant="caption">Tap a row to open the curve. Sort by tapping a header. FF and efficiency in %; J0 per cell area.</Txt>
        </View>
      </Card>
      )}

      {asGrid ? (
      <Card title="Statistics side by side">
        <View style={styles.chips}>
          {GRID_PARAMS.map((k) => (
            <Chip key={k} on={param === k} label={PARAM_LABELS[k]} onPress={() => setParam(k)} testID={`param-${k}`} />
          ))}
        </View>
        {c.kinds?.note ? <Txt variant="body" style={styles.note} testID="kinds-note">{c.kinds.note}</Txt> : null}
        <View style={[{ gap: 16 }, wide && { flexDirection: 'row', alignItems: 'flex-start' }]}>
          <View style={[{ gap: 4 }, wide && { flex: 1 }]} testID="stats-table">
            <View style={styles.statRow}>
              <Txt variant="label" style={styles.statHead}>{shownLabel(c, param)}</Txt>
              {c.batches.map((b) => (
                <Txt key={b.id} variant="label" style={styles.statCell} numberOfLines={2}>{b.name}</Txt>
              ))}
            </View>
            {statRows.map(([label, fn]) => (
              <View key={label} style={styles.statRow}>
                <Txt variant="caption" style={styles.statHead}>{label}</Txt>
                {c.batches.map((b) => {
                  const s = shownStats(c, b.id, param);
                  return <Txt key={b.id} variant="figure" style={[styles.statCell, { fontSize: 13 }]}>{s ? fn(s) : '—'}</Txt>;
                })}
              </View>
            ))}
            {c.spec ? (
              <Txt variant="caption">Cpk against {c.spec.name} v{c.spec.version}; one-sided where only one limit is set.</Txt>
            ) : (
              <Txt variant="caption">Choose a spec to see Cpk against its limits.</Txt>
            )}
          </View>
          <View style={wide ? { flex: 1.2 } : undefined}>
            <DistributionChart
              groups={c.batches.map((b) => ({ name: b.name, values: shownValues(c, b.id, param) }))}
              label={unitOf(param) ? `${shownLabel(c, param)} (${unitOf(param)})` : shownLabel(c, param)}
              testID="distribution-chart"
            />
          </View>
        </View>
        <View style={{ gap: 6 }} testID="differences">
          <Txt variant="label">Is the difference real? (Welch’s t-test, 95 % confidence)</Txt>
          {c.differences.length === 0 ? <Txt variant="caption">Pick a second batch to compare means.</Txt> : null}
          {c.differences.map((d) => (
            <Txt key={d.batch_b} variant="body">{d.error ? `No t-test: ${d.error}` : d.sentence}</Txt>
          ))}
        </View>
        {param === 'voc_v' && c.batches.length > 1 ? (
          <View style={{ gap: 6 }} testID="voc-split">
            <Txt variant="label">Why Voc differs (single-diode picture, medians)</Txt>
            {c.batches.slice(1).map((b) => {
              const r = vocSplitSentence(c.rows, c.batches[0], b);
              return <Txt key={b.id} variant="body">{'error' in r ? `No split for ${b.name}: ${r.error}.` : r.sentence}</Txt>;
            })}
          </View>
        ) : null}
      </Card>
      ) : null}
    </>
  );
}

const styles = StyleSheet.create({
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: 6 },
  chip: { paddingHorizontal: 10, paddingVertical: 5, borderRadius: 999, borderWidth: 1, borderColor: theme.color.line, maxWidth: 320 },
  chipOn: { backgroundColor: theme.color.ink, borderColor: theme.color.ink },
  num: { width: 90, borderWidth: 1, borderColor: theme.color.line, borderRadius: theme.radius.m, paddingHorizontal: 8, paddingVertical: 5, fontFamily: theme.font.mono, fontSize: 13, color: theme.color.ink, backgroundColor: theme.color.surface },
  chooser: { flexDirection: 'row', flexWrap: 'wrap', gap: 10, padding: 10, backgroundColor: theme.color.paper, borderRadius: theme.radius.m },
  chooseRow: { flexDirection: 'row', alignItems: 'center', gap: 6 },
  statRow: { flexDirection: 'row', borderBottomWidth: 1, borderBottomColor: theme.color.sunken, paddingVertical: 3 },
  statHead: { width: 70 },
  statCell: { flex: 1, minWidth: 80, textAlign: 'right', paddingHorizontal: 4 },
  note: { backgroundColor: theme.color.holeSoft, borderRadius: theme.radius.m, padding: 10, fontSize: 14, lineHeight: 20 },
});
