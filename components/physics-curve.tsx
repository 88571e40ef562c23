import { useRouter } from 'expo-router';
import { useMemo } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { CautionBlock } from '@/components/caution-block';
import { Figure } from '@/components/figure';
import { PhysicsColumns } from '@/components/physics-columns';
import { PhysicsRange } from '@/components/physics-range';
import { PhysicsTranslateForm } from '@/components/physics-translate-form';
import { PhysicsVocChart } from '@/components/lazy-charts';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import type { CurvePhysicsJson } from '@/lib/api/physics';
import { fmtParam, sig } from '@/lib/format';
import { stcBasisText, stcMethodName } from '@/lib/analysis/stc-words';
import { stcFiguresOf } from '@/lib/schemas/curves';
import { VOC_RANGE_C } from '@/lib/schemas/physics';
import { isAboveElv } from '@/lib/strings/cautions';
import { keysToWords } from '@/lib/schemas/field-words';

/**
 * What one curve's fits say: J0 and the implied Voc, the Voc temperature coefficient and Voc across
 * temperature, the double diode's recombination shares, the STC figures and a translation.
 */
/** The Voc chart's temperature range as typed, with each end's error. */
export type VocRangeInput = { from: string; to: string; onFrom: (t: string) => void; onTo: (t: string) => void; errors: { from?: string; to?: string }; valid: boolean };

export function PhysicsCurve({ p, wide, range }: { p: CurvePhysicsJson; wide: boolean; range?: VocRangeInput }) {
  const router = useRouter();
  const s = p.single;
  const c = p.conditions;
  const module = c.cells > 1 || isAboveElv(p.curve.metrics.voc_v);
  const coef = s?.coefficient;
  const lawName = (law: string) => (law === 'desoto' ? 'I0 ∝ T³·exp(−Eg/kT) (De Soto et al. 2006)' : 'I0 ∝ n_i(T)^(2/n)');
  const conditions = [fmtParam('temp_c', c.temp_c), c.irradiance_w_m2 != null ? fmtParam('irradiance_w_m2', c.irradiance_w_m2) : 'irradiance not given', `${c.cells} cell${c.cells === 1 ? '' : 's'} in series`, c.area_cm2 != null ? fmtParam('area_cm2', c.area_cm2) : 'no area'].join(' · ');
  const measured = useMemo(() => ({ temp_c: c.temp_c, voc_v: p.curve.metrics.voc_v }), [c.temp_c, p.curve.metrics.voc_v]);

  const head = (
    <Card testID="physics-curve">
      <View style={styles.curveHead}>
        <View style={{ flex: 1, minWidth: 200, gap: 2 }}>
          <Txt variant="heading">Curve {p.curve.device_id}</Txt>
          <Txt variant="caption">{[p.curve.batch?.name, conditions].filter(Boolean).join(' · ')}</Txt>
        </View>
        <View style={{ flexDirection: 'row', gap: 8, flexWrap: 'wrap' }}>
          <Button label="Open the curve" kind="secondary" onPress={() => router.push(`/curves/${p.curve.id}`)} />
          <Button label="Without the curve" kind="quiet" onPress={() => router.replace(p.curve.batch ? `/physics?batch=${encodeURIComponent(p.curve.batch.id)}` : '/physics')} testID="physics-clear-curve" />
        </View>
      </View>
    </Card>
  );

  if (!s) {
    return (
      <View style={{ gap: 16 }}>
        {head}
        <View style={styles.empty} testID="physics-curve-empty">
          <Txt variant="body">This curve has no converged single-diode fit, so J0 and its temperature behaviour cannot be derived. Fit it again from the curve page.</Txt>
          {p.notes.map((n) => (
            <Txt key={n} variant="caption">{keysToWords(n)}</Txt>
          ))}
        </View>
      </View>
    );
  }

  const figures = (
    <Card title="Saturation current and temperature" testID="curve-physics-figures">
      <View style={styles.figures}>
        <Figure
          label="J0 per cell area (A/cm²)"
          value={s.j0_a_cm2 != null ? sig(s.j0_a_cm2, 3) : 'no area'}
          note={s.j0_a_cm2 != null ? `I0 ${fmtParam('i0_a', s.params.i0_a, 3)} over ${sig(c.cell_area_cm2, 4)} cm² per cell, n = ${s.params.n.toFixed(3)}` : 'J0 needs the device area: refit the curve with it.'}
          testID="j0-figure"
        />
        <Figure
          label="Implied Voc from Jsc and J0"
          value={s.implied_voc ? fmtParam('voc_v', s.implied_voc.voc_v) : '—'}
          note={s.implied_voc ? `measured Voc ${fmtParam('voc_v', s.implied_voc.measured_voc_v)}; n·Ns·kT/q·ln(Jsc/J0 + 1)` : undefined}
          warn={!!s.implied_voc && isAboveElv(s.implied_voc.voc_v)}
          testID="implied-voc"
        />
        {coef ? (
          <Figure
            label="Voc temperature coefficient β"
            value={`${(coef.beta_v_per_k * 1000).toFixed(1)} mV/K`}
            note={`${coef.beta_pct_per_k.toFixed(3)} %/K · ${(coef.beta_per_cell_v_per_k * 1000).toFixed(2)} mV/K per cell · ${lawName(coef.law)}, Isc +${(coef.alpha_isc_rel_per_k * 100).toFixed(2)} %/K`}
            testID="voc-coefficient"
          />
        ) : null}
        {s.coefficient_de_soto ? (
          <Figure label="β with the De Soto law" value={`${s.coefficient_de_soto.beta_pct_per_k.toFixed(3)} %/K`} note={`${(s.coefficient_de_soto.beta_v_per_k * 1000).toFixed(1)} mV/K; no 1/n in its exponent, so steeper for n > 1`} />
        ) : null}
      </View>
      {p.double ? (
        <View style={{ gap: 6 }} testID="recombination-shares">
          <Txt variant="label">Double-diode fit: where the diode current goes at the maximum power point</Txt>
          {p.double.shares ? (
            <View style={styles.figures}>
              <Figure label={`Diffusion (n1 = ${p.double.params.n1.toFixed(2)})`} value={`${(100 * p.double.shares.diffusion_share).toFixed(1)} %`} note={`${fmtParam('i0_a', p.double.shares.diode1_a, 3)}${p.double.j01_a_cm2 != null ? ` · J01 ${fmtParam('j0_a_cm2', p.double.j01_a_cm2, 3)}` : ''}`} />
              <Figure label={`Depletion region (n2 = ${p.double.params.n2.toFixed(2)})`} value={`${(100 * p.double.shares.depletion_share).toFixed(1)} %`} note={`${fmtParam('i0_a', p.double.shares.diode2_a, 3)}${p.double.j02_a_cm2 != null ? ` · J02 ${fmtParam('j0_a_cm2', p.double.j02_a_cm2, 3)}` : ''}`} />
            </View>
          ) : (
            <Txt variant="caption">The shares could not be computed (see the notes below).</Txt>
          )}
        </View>
      ) : null}
    </Card>
  );

  const points = s.voc_vs_temperature?.points ?? [];
  const shownRange = points.length ? `${fmtParam('temp_c', points[0].temp_c)} to ${fmtParam('temp_c', points[points.length - 1].temp_c)}` : '';
  const chart = (
    <Card title="Voc across cell temperature">
      {range ? <PhysicsRange unit="°C" from={range.from} to={range.to} onFrom={range.onFrom} onTo={range.onTo} errors={range.errors} defaults={VOC_RANGE_C} testID="voc-range" /> : null}
      {range && !range.valid ? null : s.voc_vs_temperature ? (
        <>
          <PhysicsVocChart points={s.voc_vs_temperature.points} measured={measured} testID="voc-temperature-chart" />
          <Txt variant="caption">
            ━ predicted from the single-diode fit ({lawName(s.voc_vs_temperature.law)}, n, Rs, Rsh held) ◆ measured {fmtParam('voc_v', measured.voc_v)} at {measured.temp_c} °C. {shownRange}. The coldest morning gives the highest voltage.
          </Txt>
        </>
      ) : (
        <Txt variant="body">The prediction could not be computed (see the notes below).</Txt>
      )}
    </Card>
  );

  const stcFigures = stcFiguresOf(p.stc);
  const stc = (
    <Card title="At standard test conditions" testID="physics-stc">
      {stcFigures ? (
        <>
          <View style={styles.figures}>
            <Figure label="Isc" value={fmtParam('isc_a', stcFigures.isc_a)} />
            <Figure label="Voc" value={fmtParam('voc_v', stcFigures.voc_v)} warn={isAboveElv(stcFigures.voc_v)} />
            <Figure label="Pmax" value={fmtParam('pmp_w', stcFigures.pmp_w)} note={`at ${fmtParam('vmp_v', stcFigures.vmp_v)}, ${fmtParam('imp_a', stcFigures.imp_a)}`} />
            <Figure label="Fill factor" value={fmtParam('ff', stcFigures.ff)} />
            {stcFigures.efficiency != null ? <Figure label="Efficiency" value={fmtParam('efficiency', stcFigures.efficiency)} /> : null}
          </View>
          <Txt variant="caption">
            {stcMethodName(p.stc)}: {stcBasisText(p.stc)} {stcFigures.notes.join(' ')}
          </Txt>
        </>
      ) : (
        <Txt variant="body" testID="physics-stc-absent">{stcBasisText(p.stc)}</Txt>
      )}
    </Card>
  );

  const translate = (
    <Card title="Translate to other conditions">
      <PhysicsTranslateForm physics={p} />
    </Card>
  );

  return (
    <View style={{ gap: 16 }}>
      {head}
      {module ? <CautionBlock /> : null}
      {wide ? (
        <PhysicsColumns wide>
          <View style={{ flex: 1, gap: 16 }}>
            {figures}
            {stc}
          </View>
          <View style={{ flex: 1, gap: 16 }}>
            {chart}
            {translate}
          </View>
        </PhysicsColumns>
      ) : (
        <>
          {figures}
          {chart}
          {stc}
          {translate}
        </>
      )}
      {p.notes.length ? (
        <Txt variant="caption" testID="physics-notes">
          {keysToWords(p.notes.join(' '))}
        </Txt>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: 14 },
  curveHead: { flexDirection: 'row', flexWrap: 'wrap', gap: 12, alignItems: 'flex-end', justifyContent: 'space-between' },
  empty: { padding: 16, borderRadius: theme.radius.m, gap: 8, borderWidth: 1, backgroundColor: theme.color.sunken, borderColor: theme.color.line },
});
