import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { Card } from '@/components/card';
import { CautionBlock } from '@/components/caution-block';
import { StringVocChart } from '@/components/lazy-charts';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { MEASURED_MIN_SPAN_K } from '@/lib/schemas/strings';
import type { CoefficientSource, ModuleSource, StringSizeResponse } from '@/lib/schemas/strings';
import { ELV_LIMIT_V, isAboveElv } from '@/lib/strings/cautions';

const volts = (v: number, digits = 1) => `${v.toFixed(digits)} V`;
const signed = (x: number, digits = 3) => `${x > 0 ? '+' : ''}${x.toFixed(digits)}`;

/** One big figure with its unit; voltages above the touch limit turn red with a tag. */
function BigFigure({ label, value, unit, note, warn, testID }: { label: string; value: string; unit?: string; note?: string; warn?: boolean; testID?: string }) {
  return (
    <View style={styles.big} testID={testID}>
      <Txt variant="label">{label}</Txt>
      <View style={styles.bigRow}>
        <Txt variant="figureLarge" style={[styles.bigValue, warn && { color: theme.color.danger }]}>{value}</Txt>
        {unit ? <Txt variant="figure" style={[styles.bigUnit, warn && { color: theme.color.danger }]}>{unit}</Txt> : null}
      </View>
      {warn ? (
        <View style={styles.elvTag} testID={testID ? `${testID}-elv` : undefined}>
          <Txt variant="caption" style={{ color: theme.color.danger }}>above {ELV_LIMIT_V} V DC</Txt>
        </View>
      ) : null}
      {note ? <Txt variant="caption">{note}</Txt> : null}
    </View>
  );
}

function moduleText(s: ModuleSource | null, what: string): string {
  if (!s || s.kind === 'entered') return 'Typed in.';
  if (s.kind === 'curve') return `${s.note} ${what} from the curve’s STC figures (measured at STC, IEC 60891 or the fitted model, whichever held for it).`;
  return `${s.note} ${what} of each curve from its STC figures (measured at STC, IEC 60891 or the fitted model, whichever held for it); curves without STC figures are left out.`;
}

function coefficientText(s: CoefficientSource | null, lawInFull: boolean): string {
  if (!s || s.kind === 'entered') return 'Typed in.';
  if (s.kind === 'measured') {
    const pts = s.points.map((p) => `${p.temp_c} °C: ${p.voc_v.toFixed(2)} V (${p.curves} curve${p.curves === 1 ? '' : 's'})`).join('; ');
    return `Measured across ${s.points.length} temperatures spanning ${s.span_k} K (${pts}); r² ${s.r2.toFixed(3)}. Rule: ${s.rule}`;
  }
  return [
    `Derived from the fitted diode model of ${s.device_id} (fitted at ${s.fit_temp_c} °C, ${s.cells} cells in series), not measured.`,
    s.note,
    lawInFull ? `Method: ${s.law_text}` : 'Same model and method as the Voc coefficient.',
    lawInFull ? `Curves at two temperatures ${MEASURED_MIN_SPAN_K} K or more apart would give a measured coefficient.` : null,
  ]
    .filter(Boolean)
    .join(' ');
}

function SourceRow({ label, value, text, warn, testID }: { label: string; value: string; text: string; warn?: boolean; testID?: string }) {
  return (
    <View style={styles.sourceRow} testID={testID}>
      <View style={styles.sourceHead}>
        <Txt variant="label" style={{ flex: 1, minWidth: 140 }}>{label}</Txt>
        <Txt variant="figure" style={warn ? { color: theme.color.danger } : undefined}>{value}{warn ? `  (above ${ELV_LIMIT_V} V DC)` : ''}</Txt>
      </View>
      <Txt variant="caption">{text}</Txt>
    </View>
  );
}

/**
 * The sizing answer: big figures (modules, cold string Voc highlighted above 60 V DC, margin,
 * least modules), warnings, the expanded high-voltage caution, where every input came from, and
 * the string's Voc against ambient temperature for a chosen number of modules.
 */
export function StringResult({ r, wide }: { r: StringSizeResponse; wide: boolean }) {
  const [chartN, setChartN] = useState(r.max_modules);
  const i = r.inputs;
  const kindOf = (s: { kind: string } | null) => (!s ? 'entered' : s.kind);
  return (
    <View style={{ gap: 16 }} testID="string-result">
      <View style={styles.figures} testID="string-figures">
        <BigFigure label="Most modules in series" value={String(r.max_modules)} unit={r.max_modules === 1 ? 'module' : 'modules'} note={`cold Voc per module ${volts(r.voc_max_per_module_v, 2)}`} testID="max-modules" />
        <BigFigure label={`String Voc at ${i.t_min_c} °C`} value={r.string_voc_max_v.toFixed(1)} unit="V" warn={isAboveElv(r.string_voc_max_v)} note={`${r.max_modules} × ${volts(r.voc_max_per_module_v, 2)}`} testID="string-voc" />
        <BigFigure label={`Margin to ${i.v_sys_v} V`} value={r.margin_v.toFixed(1)} unit="V" note={`${r.margin_pct.toFixed(2)} % of the limit`} testID="margin" />
        <BigFigure
          label="Least modules (MPP window)"
          value={r.min_modules !== undefined ? String(r.min_modules) : '—'}
          unit={r.min_modules !== undefined ? (r.min_modules === 1 ? 'module' : 'modules') : undefined}
          note={
            r.min_modules !== undefined && r.vmp_min_per_module_v !== undefined && i.mpp_window_min_v != null
              ? `hot Vmp per module ${volts(r.vmp_min_per_module_v, 2)} at ${i.t_cell_max_c} °C; window ${i.mpp_window_min_v}–${i.mpp_window_max_v} V`
              : 'Enter the MPP window and the hottest cell temperature.'
          }
          testID="min-modules"
        />
      </View>

      {!r.fits ? (
        <View style={[styles.box, styles.danger]} testID="no-fit" accessibilityRole="alert">
          <Txt variant="heading" style={{ color: theme.color.danger }}>No string length fits both limits</Txt>
          <Txt variant="body">The MPP window needs more modules when hot than the voltage limit allows when cold. Choose another inverter or module.</Txt>
        </View>
      ) : null}

      {r.warnings.length ? (
        <View style={[styles.box, styles.warn]} testID="string-warnings">
          <Txt variant="label" style={{ color: theme.color.ink }}>Check before you use these numbers</Txt>
          {r.warnings.map((w) => (
            <Txt key={w} variant="body" style={{ fontSize: 14 }}>•  {w}</Txt>
          ))}
        </View>
      ) : null}

      <CautionBlock expanded />

      <View style={[{ gap: 16 }, wide && { flexDirection: 'row', alignItems: 'flex-start' }]}>
        <Card title="Where each input came from" style={wide ? { flex: 1 } : undefined} testID="string-sources">
          {r.source.batch ? <Txt variant="caption">Batch: {r.source.batch.name}</Txt> : null}
          <SourceRow label="Module Voc at STC" value={volts(i.voc_stc_v, 2)} warn={isAboveElv(i.voc_stc_v)} text={moduleText(r.source.module, 'Voc at STC')} testID={`source-voc-${kindOf(r.source.module)}`} />
          <SourceRow label="Voc coefficient" value={`${signed(i.beta_voc_pct_per_k)} %/K`} text={coefficientText(r.source.beta_voc, true)} testID={`source-beta-${kindOf(r.source.beta_voc)}`} />
          <SourceRow label="Record low (ambient)" value={`${i.t_min_c} °C`} text="Typed in. At first light the cells sit at ambient temperature, so the coldest morning gives the highest Voc." />
          <SourceRow label="System voltage limit" value={`${i.v_sys_v} V DC`} text="Typed in: the lower of the modules’ and the inverter’s maximum system voltage." />
          <SourceRow label="Hottest cell temperature" value={i.t_cell_max_c !== null ? `${i.t_cell_max_c} °C` : '—'} text={i.t_cell_max_c !== null ? 'Typed in.' : 'Not given.'} />
          {i.vmp_stc_v !== null ? <SourceRow label="Module Vmp at STC" value={volts(i.vmp_stc_v, 2)} warn={isAboveElv(i.vmp_stc_v)} text={moduleText(r.source.vmp_stc, 'Vmp at STC')} /> : null}
          {i.beta_vmp_pct_per_k !== null ? <SourceRow label="Vmp coefficient" value={`${signed(i.beta_vmp_pct_per_k)} %/K`} text={coefficientText(r.source.beta_vmp, r.source.beta_voc.kind !== 'model')} /> : null}
          {i.mpp_window_min_v != null ? <SourceRow label="Inverter MPP window" value={`${i.mpp_window_min_v}–${i.mpp_window_max_v} V`} text="Typed in." /> : null}
        </Card>

        <Card title="String Voc against ambient temperature" style={wide ? { flex: 1 } : undefined} testID="string-chart-card">
          <View style={styles.stepper}>
            <Txt variant="label">Modules in series</Txt>
            <Pressable onPress={() => setChartN((n) => Math.max(1, n - 1))} style={styles.step} accessibilityRole="button" accessibilityLabel="One module fewer" testID="chart-n-minus">
              <Txt variant="figure">−</Txt>
            </Pressable>
            <Txt variant="figure" testID="chart-n">{chartN}</Txt>
            <Pressable onPress={() => setChartN((n) => Math.min(n + 1, r.max_modules + 5))} style={styles.step} accessibilityRole="button" accessibilityLabel="One module more" testID="chart-n-plus">
              <Txt variant="figure">+</Txt>
            </Pressable>
          </View>
          <StringVocChart modules={chartN} voc_stc_v={i.voc_stc_v} beta_voc_pct_per_k={i.beta_voc_pct_per_k} v_sys_v={i.v_sys_v} t_min_c={i.t_min_c} testID="string-voc-chart" />
        </Card>
      </View>
      <Txt variant="caption">{r.caution}</Txt>
    </View>
  );
}

const styles = StyleSheet.create({
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: 16, backgroundColor: theme.color.surface, borderRadius: theme.radius.l, borderWidth: 1, borderColor: theme.color.line, padding: 16 },
  big: { flexGrow: 1, flexBasis: 150, minWidth: 140, gap: 2 },
  bigRow: { flexDirection: 'row', alignItems: 'baseline', gap: 6, flexWrap: 'wrap' },
  bigValue: { fontSize: 34, lineHeight: 40 },
  bigUnit: { fontSize: 16, color: theme.color.inkSoft },
  elvTag: { alignSelf: 'flex-start', backgroundColor: theme.color.dangerSoft, borderRadius: theme.radius.s, paddingHorizontal: 6, paddingVertical: 1 },
  box: { borderRadius: theme.radius.m, borderWidth: 1, padding: 12, gap: 6 },
  danger: { backgroundColor: theme.color.dangerSoft, borderColor: theme.color.danger },
  warn: { backgroundColor: theme.color.holeSoft, borderColor: theme.color.hole },
  sourceRow: { gap: 2, borderBottomWidth: 1, borderBottomColor: theme.color.sunken, paddingBottom: 8 },
  sourceHead: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'baseline', gap: 8 },
  stepper: { flexDirection: 'row', alignItems: 'center', gap: 10 },
  step: { width: 32, height: 32, borderRadius: theme.radius.m, borderWidth: 1, borderColor: theme.color.line, alignItems: 'center', justifyContent: 'center' },
});
