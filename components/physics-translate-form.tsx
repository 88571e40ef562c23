import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect } from 'react';
import { Controller, useForm } from 'react-hook-form';
import type { Path } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { Figure } from '@/components/figure';
import { FormError } from '@/components/form-error';
import { IvChart } from '@/components/lazy-charts';
import { PhysicsChoice } from '@/components/physics-choice';
import { TextField } from '@/components/text-field';
import { Txt } from '@/components/txt';
import { ApiError, toUserMessage } from '@/lib/api/client';
import { useTranslate } from '@/lib/api/physics';
import type { CurvePhysicsJson, TranslatedFigures } from '@/lib/api/physics';
import { fmtParam } from '@/lib/format';
import { thermal_voltage_v } from '@/lib/physics/constants';
import { METHOD_COEFFICIENTS, TRANSLATION_COEFFICIENTS, TRANSLATION_METHOD_LABELS, TRANSLATION_METHODS, translateSchema } from '@/lib/schemas/physics';
import type { TranslateInput, TranslateRequest, TranslationCoefficient, TranslationMethod } from '@/lib/schemas/physics';
import { keysToWords } from '@/lib/schemas/field-words';

/** The relative Isc coefficient suggested when none is measured: +0.05 %/K (common practice, c-Si). */
const ALPHA_REL_PER_K = 0.0005;

const plain = (x: number) => String(Number(x.toPrecision(3)));

/** Coefficients suggested from the curve's own fit, with where each comes from. */
function suggestions(p: CurvePhysicsJson): Partial<Record<TranslationCoefficient, { value: string; from: string }>> {
  const out: Partial<Record<TranslationCoefficient, { value: string; from: string }>> = {};
  const isc = p.curve.metrics.isc_a;
  const voc = p.curve.metrics.voc_v;
  out.alpha_a_per_k = { value: plain(ALPHA_REL_PER_K * isc), from: '+0.05 %/K of Isc (common practice)' };
  out.alpha_rel_per_k = { value: String(ALPHA_REL_PER_K), from: '+0.05 %/K (common practice)' };
  out.kappa_ohm_per_k = { value: '0', from: 'κ = 0: no curve-shape correction' };
  const s = p.single;
  if (s) {
    out.rs_ohm = { value: plain(s.params.rs_ohm), from: 'Rs of the single-diode fit' };
    if (s.coefficient) {
      out.beta_v_per_k = { value: plain(s.coefficient.beta_v_per_k), from: 'β predicted from the fit (n_i law)' };
      out.beta_rel_per_k = { value: plain(s.coefficient.beta_pct_per_k / 100), from: 'β predicted from the fit (n_i law)' };
    }
    if (voc > 0) {
      out.a_irradiance = { value: plain((s.params.n * p.conditions.cells * thermal_voltage_v(p.conditions.temp_c)) / voc), from: 'n·Ns·Vt/Voc of the fit (the diode’s own log-irradiance slope)' };
    }
  }
  return out;
}

function FigureRow({ figures, measured }: { figures: TranslatedFigures; measured: CurvePhysicsJson['curve']['metrics'] }) {
  const delta = (a: number, b: number) => (b !== 0 ? `${a >= b ? '+' : '−'}${Math.abs(100 * (a / b - 1)).toFixed(1)} %` : '—');
  const items: [keyof TranslatedFigures & keyof typeof measured, string][] = [
    ['isc_a', 'Isc'],
    ['voc_v', 'Voc'],
    ['pmp_w', 'Pmax'],
    ['ff', 'Fill factor'],
  ];
  return (
    <View style={styles.figures} testID="translated-figures">
      {items.map(([k, label]) => {
        const a = figures[k] as number;
        const b = measured[k] as number;
        return <Figure key={k} label={label} value={fmtParam(k, a)} note={`measured ${fmtParam(k, b)} (${delta(a, b)})`} testID={`translated-${k}`} />;
      })}
      {figures.efficiency != null ? <Figure label="Efficiency" value={fmtParam('efficiency', figures.efficiency)} /> : null}
    </View>
  );
}

/**
 * Translate a curve to another irradiance and temperature: by the fitted model (De Soto et al.
 * 2006) or by IEC 60891 procedure 1 or 2 with coefficients (suggested from the fit, to be
 * replaced by measured ones). Shows the translated figures beside the measured ones and both curves.
 */
export function PhysicsTranslateForm({ physics }: { physics: CurvePhysicsJson }) {
  const translate = useTranslate(physics.curve.id);
  const hints = suggestions(physics);
  const defaults: TranslateInput = {
    method: physics.single ? 'model' : 'iec60891-1',
    to: { irradiance_w_m2: '1000', temp_c: '25' },
    i0_law: 'desoto',
    ...Object.fromEntries(Object.entries(hints).map(([k, h]) => [k, h.value])),
  };
  const { control, handleSubmit, watch, setError } = useForm<TranslateInput, unknown, TranslateRequest>({
    resolver: zodResolver(translateSchema),
    defaultValues: defaults,
    shouldUnregister: true,
    mode: 'onTouched',
  });
  const method = (watch('method') ?? 'model') as TranslationMethod;
  const fields = [...METHOD_COEFFICIENTS[method].required, ...METHOD_COEFFICIENTS[method].optional];
  const { reset: dropResult } = translate;
  // An invalid input drops the previous translation: no answer stands beside input it does not answer.
  const submit = handleSubmit((v) => translate.mutate(v), () => dropResult());
  useEffect(() => {
    const sub = watch((values) => {
      if (!translateSchema.safeParse(values).success) dropResult();
    });
    return () => sub.unsubscribe();
  }, [watch, dropResult]);
  // A refusal naming an input on the form (details.input: "to.temp_c", "rs_ohm") is said at that field.
  const refusedInput = translate.error instanceof ApiError ? (translate.error.details as { input?: string } | undefined)?.input : undefined;
  const fieldNames = ['to.irradiance_w_m2', 'to.temp_c', ...fields];
  const refusedField = refusedInput && fieldNames.includes(refusedInput) ? (refusedInput as Path<TranslateInput>) : null;
  useEffect(() => {
    if (refusedField) setError(refusedField, { type: 'server', message: toUserMessage(translate.error) }, { shouldFocus: true });
  }, [refusedField, translate.error, setError]);
  const result = translate.data;

  return (
    <View style={{ gap: 12 }} testID="translate-form">
      <Controller
        control={control}
        name="method"
        render={({ field }) => (
          <PhysicsChoice
            label="Method"
            value={(field.value ?? 'model') as TranslationMethod}
            onChange={field.onChange}
            options={TRANSLATION_METHODS.filter((m) => m !== 'model' || physics.single).map((m) => ({ value: m, label: TRANSLATION_METHOD_LABELS[m] }))}
            testID="translate-method"
          />
        )}
      />
      <View style={styles.grid}>
        <View style={styles.cell}>
          <TextField control={control} name="to.irradiance_w_m2" label="Target irradiance (W/m²)" keyboardType="numeric" testID="translate-irradiance" />
        </View>
        <View style={styles.cell}>
          <TextField control={control} name="to.temp_c" label="Target cell temperature (°C)" keyboardType="numbers-and-punctuation" testID="translate-temp" />
        </View>
        {fields.map((k) => {
          const c = TRANSLATION_COEFFICIENTS[k];
          const h = hints[k];
          const hint = k === 'alpha_isc_a_per_k' ? 'Empty: +0.05 %/K of Iph (common practice)' : h ? `Suggested: ${h.from}` : undefined;
          return (
            <View key={k} style={styles.cell}>
              <TextField control={control} name={k} label={`${c.label} (${c.unit})`} hint={hint} keyboardType="numbers-and-punctuation" autoCapitalize="none" testID={`translate-${k}`} />
            </View>
          );
        })}
      </View>
      {method === 'model' ? (
        <Controller
          control={control}
          name="i0_law"
          render={({ field }) => (
            <PhysicsChoice
              label="How I0 follows temperature"
              value={(field.value ?? 'desoto') as 'desoto' | 'ni-power'}
              onChange={field.onChange}
              options={[
                { value: 'desoto', label: 'T³·exp(−Eg/kT) (De Soto)' },
                { value: 'ni-power', label: 'n_i^(2/n)' },
              ]}
            />
          )}
        />
      ) : (
        <Txt variant="caption">IEC 60891 wants coefficients measured on this kind of module. The suggestions come from this curve’s fit and common practice; replace them with measured values before relying on the result.</Txt>
      )}
      <FormError error={refusedField ? null : translate.error} />
      <Button label="Translate" onPress={submit} busy={translate.isPending} testID="translate-submit" />
      {result ? (
        <View style={{ gap: 10 }} testID="translate-result">
          <Txt variant="label">
            {TRANSLATION_METHOD_LABELS[result.method]}: from {result.from.temp_c} °C, {result.from.irradiance_w_m2} W/m² to {result.to.temp_c} °C, {result.to.irradiance_w_m2} W/m²
          </Txt>
          {result.figures ? <FigureRow figures={result.figures} measured={physics.curve.metrics} /> : <Txt variant="body">No key figures for the translated curve: {result.figures_error}</Txt>}
          <IvChart mode="iv" measured={result.measured.curve} model={result.curve} labels={{ model: 'translated' }} height={240} testID="translate-chart" />
          <Txt variant="caption">
            {result.points_total > result.curve.voltage_v.length ? `Translated curve drawn with ${result.curve.voltage_v.length} of ${result.points_total} points. ` : ''}{result.figures_source === 'model' ? 'Figures from the translated model.' : 'Figures from the translated curve.'} {keysToWords(result.notes.join(' · '))}
          </Txt>
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  grid: { flexDirection: 'row', flexWrap: 'wrap', gap: 10 },
  cell: { flexGrow: 1, flexBasis: 200, minWidth: 0 },
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: 14 },
});
