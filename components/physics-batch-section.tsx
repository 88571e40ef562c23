import { Link } from 'expo-router';
import { useMemo, useState } from 'react';
import { StyleSheet, useWindowDimensions, View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { DistributionChart } from '@/components/lazy-charts';
import { Figure } from '@/components/figure';
import { PhysicsChoice } from '@/components/physics-choice';
import { QueryState } from '@/components/query-state';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { useBatches } from '@/lib/api/batches';
import type { Batch } from '@/lib/api/batches';
import { useBatchPhysics } from '@/lib/api/physics';
import type { BatchPhysicsAnswer } from '@/lib/api/physics';
import { formatNumber, formatValue } from '@/lib/vocabulary';

type Device = BatchPhysicsAnswer['devices'][number];
type Spread = BatchPhysicsAnswer['summary']['j0_a_cm2'];

/** Batches offered as chips before "all batches" is asked for. */
const CHIPS_SHOWN = 8;
/** Device rows shown before "show more". */
const ROWS_SHOWN = 30;

/** The batches to offer, newest first (archived ones left out), and the one to open on: the newest with curves. */
export function batchChoices(batches: readonly Batch[]): { list: Batch[]; newest: Batch | null } {
  const list = batches.filter((b) => !b.archived).sort((a, b) => String(b.created_at).localeCompare(String(a.created_at)));
  return { list, newest: list.find((b) => (b.curve_count ?? 0) > 0) ?? list[0] ?? null };
}

/** The power of ten that brings `median` into 1…10, and its superscript form ("10⁻¹³"), so a J0 axis reads 5–10 rather than 5.0e-13. */
export function decade(median: number): { factor: number; words: string } {
  const e = Math.floor(Math.log10(Math.abs(median)));
  const sup = String(e).replace('-', '⁻').replace(/\d/g, (c) => '⁰¹²³⁴⁵⁶⁷⁸⁹'[Number(c)]);
  return { factor: 10 ** -e, words: e === 0 ? '' : `10${sup} ` };
}

/** "median 20.41 V, middle half 20.38–20.44 V" in the key's unit. */
function spreadWords(key: string, s: Spread): string {
  if (!s) return 'none';
  return `median ${formatValue(key, s.median)}, middle half ${formatNumber(key, s.p25)} to ${formatValue(key, s.p75)}`;
}

/**
 * The physics screen's first part: the person's own devices. A batch (the newest by default),
 * J0 per cell area and the implied Voc of its devices as distributions (each chart with its table),
 * and every device with its figures or the reason it has none, linking to its curve's physics.
 */
export function PhysicsBatchSection({ wide, batchId, onBatch }: { wide: boolean; batchId: string | null; onBatch: (id: string) => void }) {
  const batches = useBatches();
  const [allChips, setAllChips] = useState(false);
  const choices = useMemo(() => batchChoices(batches.data?.batches ?? []), [batches.data]);
  const chosen = choices.list.find((b) => b.id === batchId) ?? choices.newest;
  const physics = useBatchPhysics(chosen?.id ?? null);
  const shown = allChips ? choices.list : choices.list.slice(0, CHIPS_SHOWN);
  // A chosen batch beyond the first chips stays visible as a chip.
  if (chosen && !shown.includes(chosen)) shown.push(chosen);
  return (
    <Card title="Your devices" testID="physics-batch">
      <Txt variant="caption">
        J0 per cell area from each device’s single-diode fit, and the Voc that J0 and the measured Isc imply. Pick a batch; each device links to its own physics.
      </Txt>
      <QueryState query={batches} isEmpty={() => choices.list.length === 0} empty="No batches yet. Upload curves to a batch and their J0 and implied Voc appear here.">
        {() => (
          <View style={{ gap: 6 }}>
            <PhysicsChoice label="Batch" value={chosen?.id ?? ''} options={shown.map((b) => ({ value: b.id, label: b.name }))} onChange={onBatch} testID="physics-batch-pick" />
            {choices.list.length > CHIPS_SHOWN ? (
              <View style={{ flexDirection: 'row' }}>
                <Button kind="quiet" label={allChips ? 'Fewer batches' : `All ${choices.list.length} batches`} onPress={() => setAllChips((v) => !v)} testID="physics-batch-all" />
              </View>
            ) : null}
          </View>
        )}
      </QueryState>
      {chosen ? (
        <QueryState query={physics} isEmpty={(a) => a.devices.length === 0} empty="This batch has no curves yet.">
          {(a) => <BatchPhysics a={a} wide={wide} />}
        </QueryState>
      ) : null}
    </Card>
  );
}

function BatchPhysics({ a, wide }: { a: BatchPhysicsAnswer; wide: boolean }) {
  const s = a.summary;
  const values = (k: 'j0_25c_a_cm2' | 'implied_voc_v' | 'implied_voc_25c_v') => a.devices.map((d) => d[k]).filter((v): v is number => v != null);
  const j0Decade = s.j0_25c_a_cm2 ? decade(s.j0_25c_a_cm2.median) : null;
  const vocSpread = s.implied_voc_25c_v ? (s.implied_voc_25c_v.p75 - s.implied_voc_25c_v.p25) * 1000 : null;
  return (
    <View style={{ gap: 14 }}>
      <View style={styles.figures}>
        <Figure label="Devices with figures" value={`${s.usable} of ${s.total}`} note={s.usable < s.total ? 'The others say why in the list below.' : 'Every curve has a usable fit.'} testID="batch-physics-usable" />
        <Figure label="J0 at 25 °C, median" value={s.j0_25c_a_cm2 ? formatValue('j0_25c_a_cm2', s.j0_25c_a_cm2.median) : 'no area'} note={s.j0_25c_a_cm2 ? `middle half ${formatNumber('j0_a_cm2', s.j0_25c_a_cm2.p25)} to ${formatNumber('j0_a_cm2', s.j0_25c_a_cm2.p75)}` : 'J0 needs the device area (file or batch).'} testID="batch-physics-j0" />
        <Figure label="Implied Voc at 25 °C, median" value={s.implied_voc_25c_v ? formatValue('implied_voc_25c_v', s.implied_voc_25c_v.median) : '—'} note={vocSpread != null ? `middle half ${vocSpread.toFixed(1)} mV wide` : undefined} testID="batch-physics-voc" />
      </View>
      <Txt variant="body" testID="batch-physics-words">
        As fitted, J0 per cell area is {spreadWords('j0_a_cm2', s.j0_a_cm2)}; the implied Voc is {spreadWords('implied_voc_v', s.implied_voc_v)} at the measured temperatures and {spreadWords('implied_voc_25c_v', s.implied_voc_25c_v)} at 25 °C.
      </Txt>
      <Txt variant="caption">{a.basis}</Txt>
      {s.usable > 0 ? (
        <View style={[styles.charts, wide && styles.chartsWide]}>
          {s.j0_25c_a_cm2 ? (
            <View style={styles.chart}>
              <DistributionChart
                groups={[{ name: 'At 25 °C', values: values('j0_25c_a_cm2').map((v) => v * (j0Decade?.factor ?? 1)) }]}
                label={`J0 at 25 °C (${j0Decade?.words ?? ''}A/cm²)`}
                groupWord="Temperature"
                fileName={a.batch.name}
                testID="batch-physics-j0-chart"
              />
            </View>
          ) : null}
          <View style={styles.chart}>
            <DistributionChart
              groups={[
                { name: 'Measured temp.', values: values('implied_voc_v') },
                { name: 'At 25 °C', values: values('implied_voc_25c_v') },
              ]}
              label="Implied Voc (V)"
              groupWord="Temperature"
              fileName={a.batch.name}
              testID="batch-physics-voc-chart"
            />
          </View>
        </View>
      ) : null}
      <DeviceList a={a} />
    </View>
  );
}

const COLUMNS = [
  ['Device', 1.4],
  ['Cell temp. (°C)', 0.8],
  ['J0 (A/cm²)', 1],
  ['J0 at 25 °C (A/cm²)', 1],
  ['Implied Voc (V)', 1],
  ['Implied Voc at 25 °C (V)', 1],
  ['Measured Voc (V)', 1],
] as const;

/** Every device: a table on wide screens, a block a device on phones; the first rows, then more on request. */
function DeviceList({ a }: { a: BatchPhysicsAnswer }) {
  const [rows, setRows] = useState(ROWS_SHOWN);
  const wide = useWindowDimensions().width >= theme.tableFrom;
  const list = a.devices.slice(0, rows);
  const more = a.devices.length - list.length;
  const link = (d: Device) => (
    // Pushed as a screen of its own: it opens at the top with the curve, and Back returns to this list where it was.
    <Link push href={`/physics?curve=${encodeURIComponent(d.curve_id)}&batch=${encodeURIComponent(a.batch.id)}`} style={styles.link} accessibilityLabel={`Physics of ${d.device_id}`} testID={`batch-physics-link-${d.device_id}`}>
      {d.device_id}
    </Link>
  );
  return (
    <View style={{ gap: 8 }} testID="batch-physics-devices">
      <Txt variant="label">Devices ({a.devices.length})</Txt>
      {wide ? (
        <View role="table" aria-label={`J0 and implied Voc of the devices of ${a.batch.name}`} style={styles.table}>
          <View role="row" style={[styles.row, styles.headRow]}>
            {COLUMNS.map(([c, f]) => (
              <Txt key={c} variant="label" role="columnheader" style={[styles.cell, { flex: f }]}>{c}</Txt>
            ))}
          </View>
          {list.map((d) => (
            <View key={d.curve_id} role="row" style={styles.row}>
              <View role="cell" style={[styles.cell, { flex: 1.4 }]}>{link(d)}</View>
              {d.implied_voc_v == null ? (
                <Txt role="cell" variant="caption" style={[styles.cell, { flex: 5.8 }]}>{d.reason}</Txt>
              ) : (
                <>
                  {[
                    [formatNumber('temp_c', d.temp_c), 0.8],
                    [formatNumber('j0_a_cm2', d.j0_a_cm2), 1],
                    [formatNumber('j0_a_cm2', d.j0_25c_a_cm2), 1],
                    [formatNumber('implied_voc_v', d.implied_voc_v), 1],
                    [formatNumber('implied_voc_v', d.implied_voc_25c_v), 1],
                    [formatNumber('voc_v', d.measured_voc_v), 1],
                  ].map(([v, f], k) => (
                    <Txt key={k} role="cell" variant="figure" style={[styles.cell, { flex: f as number, fontSize: 13 }]}>{v}</Txt>
                  ))}
                </>
              )}
            </View>
          ))}
        </View>
      ) : (
        <View style={{ gap: 6 }}>
          {list.map((d) => (
            <View key={d.curve_id} style={styles.block}>
              <View style={{ flexDirection: 'row', justifyContent: 'space-between', gap: 8, flexWrap: 'wrap' }}>
                {link(d)}
                {d.temp_c != null ? <Txt variant="caption">{formatValue('temp_c', d.temp_c)}</Txt> : null}
              </View>
              {d.implied_voc_v == null ? (
                <Txt variant="caption">{d.reason}</Txt>
              ) : (
                <>
                  <Txt variant="figure" style={{ fontSize: 13 }}>J0 {d.j0_a_cm2 != null ? `${formatValue('j0_a_cm2', d.j0_a_cm2)} · at 25 °C ${formatNumber('j0_a_cm2', d.j0_25c_a_cm2)}` : '— (no area)'}</Txt>
                  <Txt variant="figure" style={{ fontSize: 13 }}>Implied Voc {formatValue('implied_voc_v', d.implied_voc_v)} · at 25 °C {formatNumber('implied_voc_v', d.implied_voc_25c_v)}</Txt>
                  <Txt variant="caption">Measured Voc {formatValue('voc_v', d.measured_voc_v)}</Txt>
                </>
              )}
            </View>
          ))}
        </View>
      )}
      {d0Reason(a) ? <Txt variant="caption">{d0Reason(a)}</Txt> : null}
      {more > 0 ? (
        <View style={{ flexDirection: 'row' }}>
          <Button kind="secondary" label={`Show ${Math.min(more, 100)} more of ${more}`} onPress={() => setRows((r) => r + 100)} testID="batch-physics-more" />
        </View>
      ) : null}
    </View>
  );
}

/** A note for devices that have an implied Voc but still a reason (no area): said once under the list. */
function d0Reason(a: BatchPhysicsAnswer): string | null {
  const n = a.devices.filter((d) => d.implied_voc_v != null && d.reason).length;
  return n ? `${n} device${n === 1 ? '' : 's'} without J0: ${a.devices.find((d) => d.implied_voc_v != null && d.reason)?.reason}` : null;
}

const styles = StyleSheet.create({
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: 14 },
  charts: { gap: 14 },
  chartsWide: { flexDirection: 'row' },
  chart: { flex: 1, minWidth: 0 },
  table: { borderWidth: 1, borderColor: theme.color.line, borderRadius: theme.radius.s },
  row: { flexDirection: 'row', gap: 10, paddingVertical: 6, paddingHorizontal: 8, borderTopWidth: 1, borderTopColor: theme.color.line, alignItems: 'center' },
  headRow: { borderTopWidth: 0, backgroundColor: theme.color.sunken },
  cell: { minWidth: 0 },
  block: { borderWidth: 1, borderColor: theme.color.line, borderRadius: theme.radius.m, padding: 10, gap: 3 },
  link: { color: theme.color.electron, fontFamily: theme.font.medium, textDecorationLine: 'underline', fontSize: 15 },
});
