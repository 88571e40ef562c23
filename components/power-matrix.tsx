import { useState } from 'react';
import { Pressable, ScrollView, StyleSheet, View } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import type { Characterisation } from '@/lib/analysis/characterise';
import { MATRIX_EXCLUDED, MATRIX_IRRADIANCES_W_M2, MATRIX_TEMPS_C } from '@/lib/analysis/characterise/matrix';

type Cell = Characterisation['matrix'][number];
const FIGURES = [
  { key: 'pmp_w', label: 'Pmax', unit: 'W', digits: 1 },
  { key: 'voc_v', label: 'Voc', unit: 'V', digits: 2 },
  { key: 'isc_a', label: 'Isc', unit: 'A', digits: 3 },
  { key: 'ff_pct', label: 'FF', unit: '%', digits: 1 },
  { key: 'eff', label: 'Pmax/G', unit: '% of STC', digits: 1 },
] as const;
type FigureKey = (typeof FIGURES)[number]['key'];

const LOW = [0xf8, 0xeb, 0xcf]; // theme.color.holeSoft
const HIGH = [0x7f, 0xc4, 0xbb]; // a light electron teal, dark text stays readable on it
const mix = (u: number) => `rgb(${LOW.map((c, k) => Math.round(c + (HIGH[k] - c) * Math.max(0, Math.min(1, u)))).join(',')})`;

/**
 * The IEC 61853-1 matrix as a table whose cells are coloured by the chosen figure (a heat map):
 * rows irradiance, columns cell temperature; "m" measured, "t" translated (IEC 60891), "—" not
 * covered by the curves (never extrapolated), blank where the standard has no point.
 */
export function PowerMatrix({ matrix, stcPmp, testID }: { matrix: Cell[]; stcPmp: number | null; testID?: string }) {
  const [figure, setFigure] = useState<FigureKey>('pmp_w');
  const f = FIGURES.find((x) => x.key === figure)!;
  const value = (c: Cell) => (figure === 'eff' ? (stcPmp ? (100 * (c.pmp_w / c.irradiance_wm2)) / (stcPmp / 1000) : NaN) : c[figure]);
  const vals = matrix.map(value).filter(Number.isFinite);
  const lo = Math.min(...vals);
  const hi = Math.max(...vals);
  const at = (g: number, t: number) => matrix.find((c) => c.irradiance_wm2 === g && c.temp_c === t);
  return (
    <View style={{ gap: 8 }} testID={testID}>
      <View style={styles.chips} accessibilityRole="radiogroup">
        {FIGURES.map((x) => (
          <Pressable key={x.key} onPress={() => setFigure(x.key)} accessibilityRole="radio" accessibilityState={{ selected: x.key === figure }} style={[styles.chip, x.key === figure && styles.chipOn]} testID={`matrix-figure-${x.key}`}>
            <Txt variant="label" style={x.key === figure ? { color: theme.color.surface } : undefined}>
              {x.label}
            </Txt>
          </Pressable>
        ))}
      </View>
      <ScrollView horizontal>
        <View>
          <View style={styles.row}>
            <Txt variant="caption" style={[styles.head, styles.first]}>
              W/m²
            </Txt>
            {MATRIX_TEMPS_C.map((t) => (
              <Txt key={t} variant="caption" style={styles.head}>
                {t} °C
              </Txt>
            ))}
          </View>
          {MATRIX_IRRADIANCES_W_M2.map((g) => (
            <View key={g} style={styles.row}>
              <Txt variant="caption" style={[styles.head, styles.first]}>
                {g}
              </Txt>
              {MATRIX_TEMPS_C.map((t) => {
                const c = at(g, t);
                const v = c ? value(c) : NaN;
                if (MATRIX_EXCLUDED.some(([eg, et]) => eg === g && et === t)) return <View key={t} style={[styles.cell, styles.none]} testID={`matrix-${g}-${t}`} />;
                return (
                  <View key={t} style={[styles.cell, c && Number.isFinite(v) ? { backgroundColor: mix(hi > lo ? (v - lo) / (hi - lo) : 0.5) } : null]} testID={`matrix-${g}-${t}`}>
                    <Txt variant="body" style={styles.num}>
                      {c && Number.isFinite(v) ? v.toFixed(f.digits) : '—'}
                    </Txt>
                    {c ? <Txt variant="caption">{c.source === 'measured' ? 'm' : 't'}</Txt> : null}
                  </View>
                );
              })}
            </View>
          ))}
        </View>
      </ScrollView>
      <Txt variant="caption">
        {f.label} in {f.unit}. m: measured within ±2 % and ±2 K; t: translated from the nearest curve by IEC 60891; —: outside the conditions measured (not extrapolated); grey: no point of the standard’s grid. Colour from the lowest (amber) to the highest (teal) value shown.
      </Txt>
    </View>
  );
}

const styles = StyleSheet.create({
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: 6 },
  chip: { paddingHorizontal: 10, paddingVertical: 6, borderRadius: theme.radius.m, borderWidth: 1, borderColor: theme.color.line, backgroundColor: theme.color.surface },
  chipOn: { backgroundColor: theme.color.ink, borderColor: theme.color.ink },
  row: { flexDirection: 'row' },
  head: { width: 66, paddingVertical: 6, textAlign: 'center' },
  first: { width: 58, textAlign: 'left' },
  cell: { width: 66, height: 44, borderWidth: StyleSheet.hairlineWidth, borderColor: theme.color.line, alignItems: 'center', justifyContent: 'center' },
  num: { fontFamily: theme.font.mono, fontSize: 13 },
  none: { backgroundColor: theme.color.sunken },
});
