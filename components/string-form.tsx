import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useState } from 'react';
import { useForm } from 'react-hook-form';
import { Pressable, ScrollView, StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { QueryState } from '@/components/query-state';
import { SizingError } from '@/components/string-error';
import { TextField } from '@/components/text-field';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { useBatches } from '@/lib/api/batches';
import { sizingFieldOf, sizingMessageForForm, stringSizeSchema } from '@/lib/schemas/strings';
import { labelWithUnit } from '@/lib/vocabulary';
import type { StringSizeInput, StringSizeRequest } from '@/lib/schemas/strings';

type Mode = 'batch' | 'typed';
type Limit = '1000' | '1500' | 'other';

function Chips<T extends string>({ value, options, onChange, label }: { value: T | null; options: { value: T; label: string; testID?: string }[]; onChange: (v: T) => void; label: string }) {
  return (
    <View style={{ gap: 4 }}>
      <Txt variant="label">{label}</Txt>
      <View style={styles.chips} accessibilityRole="radiogroup" accessibilityLabel={label}>
        {options.map((o) => (
          <Pressable key={o.value} onPress={() => onChange(o.value)} accessibilityRole="radio" aria-checked={value === o.value} style={[styles.chip, value === o.value && styles.chipOn]} testID={o.testID}>
            <Txt variant="label" style={{ color: value === o.value ? '#fff' : theme.color.inkSoft }}>{o.label}</Txt>
          </Pressable>
        ))}
      </View>
    </View>
  );
}

const NUMERIC = { keyboardType: 'numbers-and-punctuation' as const, inputMode: 'decimal' as const };

/** The module fields, which the batch mode hides unless its values are overridden. */
const MODULE_FIELDS = ['voc_stc_v', 'beta_voc_pct_per_k', 'vmp_stc_v', 'beta_vmp_pct_per_k'] as const;
/** Every field that shows its own error (the system limit's under its chips when no field is open). */
const FORM_FIELDS = [...MODULE_FIELDS, 't_min_c', 't_cell_max_c', 'v_sys_v', 'mpp_window_min_v', 'mpp_window_max_v'] as const;

/**
 * The inputs of string sizing: a batch (its worst module and coefficients) or typed module
 * values, then the site (record low, hottest cell), the system voltage limit and the inverter's
 * MPP window. Checked with the same zod schema as POST /api/strings/size, as each field is left
 * and on sizing. Every error is shown once, at its field: the schema's, and the server's when it
 * names a field on the form; only a message about no field on the form shows by the button. As
 * soon as the input is not valid, `onInvalid` lets the screen drop the previous result.
 */
export function StringForm({
  onSubmit,
  onInvalid,
  busy,
  serverError,
  summary,
  wide,
}: {
  onSubmit: (v: StringSizeRequest) => void;
  /** The input is not valid (any field): the previous result no longer answers it. */
  onInvalid: () => void;
  busy: boolean;
  /** The failed request's message as the API sent it (its keys are turned into the form's labels here), and when it was sent. */
  serverError: { message: string; at: number } | null;
  /** One line of the result by the button, so a phone user knows it is below. */
  summary: string | null;
  wide: boolean;
}) {
  const batches = useBatches();
  const [mode, setMode] = useState<Mode>('batch');
  const [limit, setLimit] = useState<Limit | null>(null);
  const [overrides, setOverrides] = useState(false);
  const [pickError, setPickError] = useState<string | null>(null);
  const {
    control,
    handleSubmit,
    setError,
    setValue,
    watch,
    formState: { errors },
  } = useForm<StringSizeInput, unknown, StringSizeRequest>({
    resolver: zodResolver(stringSizeSchema),
    // A field is checked when it is left, then as it changes: the error stands at the field.
    mode: 'onTouched',
    defaultValues: { batch_id: '', voc_stc_v: '', beta_voc_pct_per_k: '', vmp_stc_v: '', beta_vmp_pct_per_k: '', t_min_c: '', t_cell_max_c: '', v_sys_v: '', mpp_window_min_v: '', mpp_window_max_v: '' },
  });
  const batch_id = watch('batch_id');
  const moduleShown = mode === 'typed' || overrides;

  // Any edit that makes the input invalid drops the result it no longer answers.
  useEffect(() => {
    const sub = watch((values) => {
      if (!stringSizeSchema.safeParse(values).success) onInvalid();
    });
    return () => sub.unsubscribe();
  }, [watch, onInvalid]);

  // The server's message goes to the field it names when that field is on the form.
  const serverField = serverError ? sizingFieldOf(serverError.message) : null;
  const placed = serverField !== null && (FORM_FIELDS as readonly string[]).includes(serverField) && (moduleShown || !(MODULE_FIELDS as readonly string[]).includes(serverField));
  useEffect(() => {
    if (serverError && placed && serverField) setError(serverField, { type: 'server', message: sizingMessageForForm(serverError.message) }, { shouldFocus: true });
  }, [serverError, placed, serverField, setError]);
  const boxError = serverError && !placed ? sizingMessageForForm(serverError.message) : null;

  const submit = handleSubmit((v) => {
    if (mode === 'batch' && !v.batch_id) {
      setPickError('Pick a batch, or choose to type the module’s values.');
      return;
    }
    setPickError(null);
    if (mode === 'typed') onSubmit({ ...v, batch_id: undefined });
    else onSubmit(overrides ? v : { ...v, voc_stc_v: undefined, beta_voc_pct_per_k: undefined, vmp_stc_v: undefined, beta_vmp_pct_per_k: undefined });
  }, onInvalid);

  const moduleFields = (
    <View style={styles.grid}>
      <View style={styles.cell}><TextField control={control} name="voc_stc_v" label={labelWithUnit('voc_stc_v')} {...NUMERIC} placeholder={mode === 'batch' ? 'from the batch' : 'e.g. 49.5'} hint="Use the highest module, not the mean." testID="voc-stc" /></View>
      <View style={styles.cell}><TextField control={control} name="beta_voc_pct_per_k" label={labelWithUnit('beta_voc_pct_per_k')} {...NUMERIC} placeholder={mode === 'batch' ? 'from the batch' : 'e.g. −0.28'} hint="Negative for silicon." testID="beta-voc" /></View>
      <View style={styles.cell}><TextField control={control} name="vmp_stc_v" label={labelWithUnit('vmp_stc_v')} {...NUMERIC} placeholder={mode === 'batch' ? 'from the batch' : 'e.g. 41.2'} hint="For the MPP window." testID="vmp-stc" /></View>
      <View style={styles.cell}><TextField control={control} name="beta_vmp_pct_per_k" label={labelWithUnit('beta_vmp_pct_per_k')} {...NUMERIC} placeholder={mode === 'batch' ? 'from the batch' : 'e.g. −0.37'} hint="For the MPP window." testID="beta-vmp" /></View>
    </View>
  );

  return (
    <View style={{ gap: 16 }} testID="string-form">
      <Card title="Module">
        <Chips<Mode>
          label="Take the module from"
          value={mode}
          onChange={(m) => {
            setMode(m);
            setPickError(null);
          }}
          options={[
            { value: 'batch', label: 'A measured batch', testID: 'source-batch' },
            { value: 'typed', label: 'Typed values', testID: 'source-typed' },
          ]}
        />
        {mode === 'batch' ? (
          <>
            <QueryState query={batches} isEmpty={(d) => !d.batches.some((b) => !b.archived)} empty="No batches yet. Choose “Typed values” to enter a datasheet’s figures.">
              {(d) => (
                <ScrollView style={{ maxHeight: wide ? 320 : 260 }} contentContainerStyle={{ gap: 6 }} nestedScrollEnabled testID="batch-picker">
                  {d.batches
                    .filter((b) => !b.archived)
                    .map((b) => {
                      const on = b.id === batch_id;
                      return (
                        <Pressable
                          key={b.id}
                          onPress={() => {
                            setValue('batch_id', b.id);
                            setPickError(null);
                          }}
                          accessibilityRole="radio"
                          aria-checked={on}
                          style={[styles.batch, on && styles.batchOn]}
                          testID={`pick-batch-${b.name}`}
                        >
                          <View style={[styles.radio, on && styles.radioOn]} />
                          <View style={{ flex: 1, gap: 2 }}>
                            <Txt variant="body" style={{ fontFamily: theme.font.medium }} numberOfLines={2}>{b.name}</Txt>
                            <Txt variant="caption">{[b.product_type, b.cells && `${b.cells} cell${b.cells === 1 ? '' : 's'} in series`, b.batch_date].filter(Boolean).join(' · ') || 'No description'}</Txt>
                          </View>
                        </Pressable>
                      );
                    })}
                </ScrollView>
              )}
            </QueryState>
            {pickError ? <Txt variant="caption" style={{ color: theme.color.danger }} accessibilityRole="alert">{pickError}</Txt> : null}
            <Txt variant="caption">
              Voc at STC is the batch’s highest module (the worst case), not the mean. The Voc coefficient is measured when the batch has curves at temperatures 5 K or more apart, else derived from the fitted diode model.
            </Txt>
            <Pressable onPress={() => setOverrides((o) => !o)} testID="toggle-overrides">
              <Txt variant="label" style={{ textDecorationLine: 'underline' }}>{overrides ? 'Use the batch’s values only' : 'Override the batch’s values…'}</Txt>
            </Pressable>
            {overrides ? moduleFields : null}
          </>
        ) : (
          moduleFields
        )}
      </Card>

      <Card title="Site and inverter">
        <View style={styles.grid}>
          <View style={styles.cell}>
            <TextField control={control} name="t_min_c" label={labelWithUnit('t_min_c')} {...NUMERIC} placeholder="e.g. −15" hint="The lowest ever recorded, not an average: cells sit at ambient at first light." testID="tmin" />
          </View>
          <View style={styles.cell}>
            <TextField control={control} name="t_cell_max_c" label={labelWithUnit('t_cell_max_c')} {...NUMERIC} placeholder="e.g. 70" hint="Needed for the least modules." testID="tcellmax" />
          </View>
        </View>
        <Chips<Limit>
          label="System voltage limit (DC)"
          value={limit}
          onChange={(l) => {
            setLimit(l);
            setValue('v_sys_v', l === 'other' ? '' : l, { shouldValidate: l !== 'other' });
          }}
          options={[
            { value: '1000', label: '1000 V', testID: 'vsys-1000' },
            { value: '1500', label: '1500 V', testID: 'vsys-1500' },
            { value: 'other', label: 'Other', testID: 'vsys-other' },
          ]}
        />
        {limit === 'other' ? (
          <TextField control={control} name="v_sys_v" label={labelWithUnit('v_sys_v')} {...NUMERIC} hint="The lower of the modules’ and the inverter’s rating." testID="vsys" />
        ) : errors.v_sys_v?.message ? (
          <Txt variant="caption" style={{ color: theme.color.danger }} accessibilityRole="alert">{errors.v_sys_v.message}</Txt>
        ) : null}
        <View style={styles.grid}>
          <View style={styles.cell}><TextField control={control} name="mpp_window_min_v" label={labelWithUnit('mpp_window_min_v')} {...NUMERIC} placeholder="e.g. 500" testID="mpp-min" /></View>
          <View style={styles.cell}><TextField control={control} name="mpp_window_max_v" label={labelWithUnit('mpp_window_max_v')} {...NUMERIC} placeholder="e.g. 1300" testID="mpp-max" /></View>
        </View>
        {boxError ? <SizingError message={boxError} /> : null}
        <Button label="Size the string" onPress={submit} busy={busy} testID="size-submit" />
        {summary ? <Txt variant="label" style={{ color: theme.color.electron }} testID="size-summary">{summary}</Txt> : null}
      </Card>
    </View>
  );
}

const styles = StyleSheet.create({
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: 6 },
  chip: { paddingHorizontal: 12, paddingVertical: 7, borderRadius: 999, borderWidth: 1, borderColor: theme.color.line, backgroundColor: theme.color.surface },
  chipOn: { backgroundColor: theme.color.ink, borderColor: theme.color.ink },
  grid: { flexDirection: 'row', flexWrap: 'wrap', gap: 10 },
  cell: { flexGrow: 1, flexBasis: 160, minWidth: 140 },
  batch: { flexDirection: 'row', alignItems: 'center', gap: 10, padding: 10, borderRadius: theme.radius.m, borderWidth: 1, borderColor: theme.color.line },
  batchOn: { borderColor: theme.color.electron, backgroundColor: theme.color.electronSoft },
  radio: { width: 16, height: 16, borderRadius: 8, borderWidth: 2, borderColor: theme.color.muted },
  radioOn: { borderColor: theme.color.electron, backgroundColor: theme.color.electron },
});
