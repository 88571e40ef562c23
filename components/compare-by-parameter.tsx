import { Pressable, StyleSheet, View } from 'react-native';
import type { TextStyle } from 'react-native';
import { Card } from '@/components/card';
import { DistributionChart } from '@/components/lazy-charts';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import type { DescribeStats } from '@/lib/api/batches';
import type { Comparison } from '@/lib/api/quality';
import { GRID_PARAMS } from '@/lib/compare-columns';
import { fmtParam, sig } from '@/lib/format';
import { uncertaintyKey } from '@/lib/quality/uncertainty';
import type { CompareRow } from '@/lib/quality/compare-table';
import { perCellLabel } from '@/lib/quality/compare-kinds';
import { isParamKey } from '@/lib/quality/params';
import type { ParamKey } from '@/lib/quality/params';
import { labelOf, toShown, unitOf } from '@/lib/vocabulary';

/** Whether the comparison shows the chosen figure per cell (batches of different kinds, lib/quality/compare-kinds.ts). */
export const perCell = (c: Comparison) => c.kinds?.basis === 'per_cell';

/** The figure's name as the comparison shows it: "Voc", or "Voc per cell" between kinds. */
export function shownLabel(c: Comparison, param: ParamKey): string {
  return perCell(c) ? perCellLabel(param) : labelOf(param);
}

/** A batch's statistics of the chosen figure, per cell when the comparison is per cell. */
export function shownStats(c: Comparison, batchId: string, param: ParamKey): DescribeStats | null {
  if (perCell(c)) return c.kinds.per_cell_stats?.[batchId] ?? null;
  return c.stats[batchId]?.[param] ?? null;
}

/** A batch's values of the chosen figure in the unit shown (FF in %), per cell when the comparison is per cell. */
export function shownValues(c: Comparison, batchId: string, param: ParamKey): number[] {
  const each = perCell(c);
  const out: number[] = [];
  for (const r of c.rows) {
    if (r.batch_id !== batchId) continue;
    const v = r[param];
    if (typeof v !== 'number' || !Number.isFinite(v)) continue;
    if (each && !(typeof r.cells === 'number' && r.cells > 0)) continue;
    out.push(toShown(param, each ? v / (r.cells as number) : v) as number);
  }
  return out;
}

/** Long batch names without spaces wrap rather than run off a phone's screen (web only). */
const breakAnywhere = { wordBreak: 'break-word', overflowWrap: 'anywhere' } as unknown as TextStyle;

/**
 * The comparison on a phone: one figure at a time for every batch. A row of choices picks the
 * figure; each batch gets a card with its kind, its statistics of that figure, a strip of its
 * spread on a scale shared by all batches, and Welch's answer against the first batch. The grid
 * of every curve stays one tap away (the screen shows it under this).
 */
export function CompareByParameter({ c, param, setParam }: { c: Comparison; param: ParamKey; setParam: (p: ParamKey) => void }) {
  const label = shownLabel(c, param);
  const stats = c.batches.map((b) => shownStats(c, b.id, param));
  const lo = Math.min(...stats.map((s) => s?.min ?? Infinity));
  const hi = Math.max(...stats.map((s) => s?.max ?? -Infinity));
  const at = (x: number) => (hi > lo ? ((x - lo) / (hi - lo)) * 100 : 50);
  const kinds = new Map((c.kinds?.batches ?? []).map((k) => [k.batch_id, k.label]));
  const fmt = (x: number | null | undefined, digits?: number) => fmtParam(param, x, digits);
  // "0.6743 … 0.7022 V": the unit once, so a range fits a phone's half width.
  const unit = unitOf(param);
  const range = (a: number, b: number) => `${unit ? fmt(a, 4).replace(` ${unit}`, '') : fmt(a, 4)} … ${fmt(b, 4)}`;
  return (
    <View style={{ gap: 16 }} testID="compare-by-parameter">
      <Card title="One figure, every batch" testID="param-view">
        <View style={styles.chips} accessibilityRole="radiogroup" accessibilityLabel="Figure to compare">
          {GRID_PARAMS.map((k) => {
            const on = param === k;
            return (
              <Pressable key={k} onPress={() => setParam(k)} style={[styles.chip, on && styles.chipOn]} accessibilityRole="radio" aria-checked={on} testID={`param-${k}`}>
                <Txt variant="caption" style={{ color: on ? '#fff' : theme.color.inkSoft }}>{labelOf(k)}</Txt>
              </Pressable>
            );
          })}
        </View>
        {c.kinds?.note ? (
          <Txt variant="body" style={styles.note} testID="kinds-note">
            {c.kinds.note}
          </Txt>
        ) : null}
      </Card>
      {c.batches.map((b, k) => {
        const s = stats[k];
        const counts = c.counts[b.id];
        const difference = c.differences.find((d) => d.batch_b === b.id);
        const uRel = relativeUncertainty(c.rows, b.id, param);
        return (
          <Card key={b.id} testID={`compare-batch-${b.name}`}>
            <View style={{ gap: 2 }}>
              <Txt variant="heading" style={breakAnywhere}>{b.name}</Txt>
              <Txt variant="caption">
                {[kinds.get(b.id), `${b.count} curve${b.count === 1 ? '' : 's'}`, counts ? `${counts.pass} pass, ${counts.fail} fail against ${c.spec?.name} v${c.spec?.version}` : null].filter(Boolean).join(' · ')}
              </Txt>
            </View>
            {s ? (
              <>
                <View style={styles.figures}>
                  <Stat label={`${label} mean`} value={fmt(s.mean)} note={s.sd != null ? `σ ${fmt(s.sd, 3)}` : 'one value'} />
                  <Stat label="median" value={fmt(s.median)} note={`n = ${s.n}${s.cpk != null ? ` · Cpk ${sig(s.cpk, 3)}` : ''}`} />
                  <Stat label="P5 … P95" value={range(s.p5, s.p95)} />
                  <Stat label="lowest … highest" value={range(s.min, s.max)} />
                </View>
                <View style={styles.strip} role="img" accessibilityLabel={`${b.name}: ${label} from ${fmt(s.min)} to ${fmt(s.max)}, median ${fmt(s.median)}`}>
                  <View style={[styles.whisker, { left: `${at(s.min)}%`, width: `${Math.max(0.5, at(s.max) - at(s.min))}%` }]} />
                  <View style={[styles.box, { left: `${at(s.p5)}%`, width: `${Math.max(1, at(s.p95) - at(s.p5))}%` }]} />
                  <View style={[styles.median, { left: `${at(s.median)}%` }]} />
                </View>
              </>
            ) : (
              <Txt variant="caption">No {label} in this batch.</Txt>
            )}
            {uRel != null ? (
              <Txt variant="caption" testID={`uncertainty-${b.name}`}>
                Each {label} carries ±{uRel.toFixed(2)} % (expanded uncertainty, k = 2) from the batch's measurement setup.
              </Txt>
            ) : null}
            {k === 0 && c.batches.length > 1 ? <Txt variant="caption">The other batches are compared with this one.</Txt> : null}
            {difference ? (
              <Txt variant="body" testID={`difference-${b.name}`}>
                {difference.error ? `No t-test: ${difference.error}` : difference.sentence}
              </Txt>
            ) : null}
          </Card>
        );
      })}
      {c.batches.length > 1 ? (
        <Card title={`${label}, all batches`}>
          <DistributionChart groups={c.batches.map((b) => ({ name: b.name, values: shownValues(c, b.id, param) }))} label={unitOf(param) ? `${label} (${unitOf(param)})` : label} height={220} testID="distribution-chart" />
          <Txt variant="caption">Boxes: quartiles; whiskers: lowest and highest; dots: every device. The strips above: lowest to highest, P5–P95 shaded, median marked, on one scale.</Txt>
        </Card>
      ) : null}
    </View>
  );
}

function Stat({ label, value, note }: { label: string; value: string; note?: string }) {
  return (
    <View style={{ minWidth: 128, flexGrow: 1, flexBasis: 128, gap: 1 }}>
      <Txt variant="caption">{label}</Txt>
      <Txt variant="figure" style={{ fontSize: 14 }}>{value}</Txt>
      {note ? <Txt variant="caption" style={{ fontFamily: theme.font.mono }}>{note}</Txt> : null}
    </View>
  );
}

const styles = StyleSheet.create({
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: 6 },
  chip: { paddingHorizontal: 10, paddingVertical: 5, borderRadius: 999, borderWidth: 1, borderColor: theme.color.line },
  chipOn: { backgroundColor: theme.color.ink, borderColor: theme.color.ink },
  note: { backgroundColor: theme.color.holeSoft, borderRadius: theme.radius.m, padding: 10, fontSize: 14, lineHeight: 20 },
  figures: { flexDirection: 'row', flexWrap: 'wrap', columnGap: 10, rowGap: 8 },
  strip: { height: 18, marginHorizontal: 4, position: 'relative' },
  whisker: { position: 'absolute', top: 8, height: 2, backgroundColor: theme.color.inkSoft },
  box: { position: 'absolute', top: 2, height: 14, backgroundColor: theme.color.electronSoft, borderWidth: 1, borderColor: theme.color.electron, borderRadius: 2 },
  median: { position: 'absolute', top: 0, width: 2, height: 18, marginLeft: -1, backgroundColor: theme.color.ink },
});

/** The relative expanded uncertainty (%) a batch's figure carries, from its first device that has one; null without. */
function relativeUncertainty(rows: readonly CompareRow[], batchId: string, param: string): number | null {
  const key = isParamKey(param) ? uncertaintyKey(param) : null;
  if (!key) return null;
  const r = rows.find((x) => x.batch_id === batchId && typeof x[key] === 'number' && typeof x[param] === 'number' && x[param] !== 0);
  return r ? ((r[key] as number) / Math.abs(r[param] as number)) * 100 : null;
}
