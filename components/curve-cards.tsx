import { Link } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import type { TextStyle } from 'react-native';
import { FlagChip } from '@/components/flag-chip';
import { SeverityBadge } from '@/components/severity-badge';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import type { CurvePageRow } from '@/lib/api/batches';
import { fmtParam } from '@/lib/format';
import type { CurveSortKey } from '@/lib/schemas/curves';
import { labelOf } from '@/lib/vocabulary';

/** The orders a phone offers (the table's columns that matter most on a card). */
const SORTS: CurveSortKey[] = ['device_id', 'pmp_w', 'ff', 'voc_v', 'isc_a', 'stc_pmp_w'];
const sortLabel = (k: CurveSortKey) => (k === 'device_id' ? 'Device' : k === 'stc_pmp_w' ? 'Pmax STC' : labelOf(k));

/** Long device ids without spaces break anywhere rather than run off a phone's screen (web only). */
const breakAnywhere = { wordBreak: 'break-word', overflowWrap: 'anywhere' } as unknown as TextStyle;

/**
 * The batch's curves as one card per device, for phones and narrow windows: the device id, its
 * result in a word (pass, warning, fail), Pmax, FF, Voc and Isc, the flags that ask for a look and
 * the spec's first reason when it fails. Sorting happens on the server as in the table; a row of
 * choices stands in for the table's headers.
 */
export function CurveCards({ rows, sort, dir, onSort }: { rows: CurvePageRow[]; sort: CurveSortKey; dir: 'asc' | 'desc'; onSort: (key: CurveSortKey, dir: 'asc' | 'desc') => void }) {
  return (
    <View style={{ gap: 8 }} testID="curve-cards">
      <View style={styles.sorts} accessibilityRole="radiogroup" accessibilityLabel="Sort the devices">
        <Txt variant="caption">Sort by</Txt>
        {SORTS.map((k) => {
          const on = sort === k;
          return (
            <Pressable
              key={k}
              onPress={() => onSort(k, on && dir === 'asc' ? 'desc' : 'asc')}
              style={[styles.sort, on && styles.sortOn]}
              accessibilityRole="radio"
              aria-checked={on}
              accessibilityLabel={`Sort by ${sortLabel(k)}`}
              testID={`card-sort-${k}`}
            >
              <Txt variant="caption" style={{ color: on ? '#fff' : theme.color.inkSoft }}>
                {sortLabel(k)}
                {on ? (dir === 'asc' ? ' ▲' : ' ▼') : ''}
              </Txt>
            </Pressable>
          );
        })}
      </View>
      {rows.map((r) => {
        const flags = r.flags.filter((f) => f.severity !== 'info');
        return (
          <Link key={r.id} href={`/curves/${r.id}`} asChild>
            <Pressable style={StyleSheet.flatten(styles.card)} testID={`curve-row-${r.device_id}`}>
              <View style={styles.top}>
                <Txt variant="figure" style={[{ color: theme.color.electron, flexShrink: 1 }, breakAnywhere]}>
                  {r.device_id}
                </Txt>
                <SeverityBadge severity={r.severity} testID={`result-${r.device_id}`} />
              </View>
              <View style={styles.figures}>
                <Fig k="pmp_w" label="Pmax" value={r.metrics.pmp_w} />
                <Fig k="ff" label="FF" value={r.metrics.ff} />
                <Fig k="voc_v" label="Voc" value={r.metrics.voc_v} />
                <Fig k="isc_a" label="Isc" value={r.metrics.isc_a} />
              </View>
              {flags.length ? (
                <View style={styles.chips}>
                  {flags.map((f) => (
                    <FlagChip key={f.code} flag={f} />
                  ))}
                </View>
              ) : null}
              {r.reasons.length ? (
                <Txt variant="caption" style={{ color: theme.color.danger }}>
                  {r.reasons[0]}
                  {r.reasons.length > 1 ? ` (and ${r.reasons.length - 1} more)` : ''}
                </Txt>
              ) : null}
            </Pressable>
          </Link>
        );
      })}
    </View>
  );
}

function Fig({ k, label, value }: { k: string; label: string; value: number | null | undefined }) {
  return (
    <View style={{ minWidth: 60, flexGrow: 1, flexBasis: 60 }}>
      <Txt variant="caption">{label}</Txt>
      <Txt variant="figure" style={{ fontSize: 14 }}>
        {fmtParam(k, value)}
      </Txt>
    </View>
  );
}

const styles = StyleSheet.create({
  sorts: { flexDirection: 'row', flexWrap: 'wrap', gap: 6, alignItems: 'center' },
  sort: { paddingHorizontal: 10, paddingVertical: 5, borderRadius: 999, borderWidth: 1, borderColor: theme.color.line },
  sortOn: { backgroundColor: theme.color.ink, borderColor: theme.color.ink },
  card: { borderWidth: 1, borderColor: theme.color.line, borderRadius: theme.radius.m, padding: 12, gap: 8, backgroundColor: theme.color.surface },
  top: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'flex-start', gap: 8 },
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: 8 },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: 4 },
});
