import { zodResolver } from '@hookform/resolvers/zod';
import { Controller, useForm } from 'react-hook-form';
import { Pressable, StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { FormError } from '@/components/form-error';
import { TextField } from '@/components/text-field';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import type { CurveDetail } from '@/lib/api/batches';
import { useRefit } from '@/lib/api/batches';
import { refitSchema } from '@/lib/schemas/curves';
import type { RefitInput } from '@/lib/schemas/curves';
import { labelWithUnit } from '@/lib/vocabulary';

function Choice<T extends string>({ value, options, onChange, label }: { value: T; options: { value: T; label: string }[]; onChange: (v: T) => void; label: string }) {
  return (
    <View style={{ gap: 4 }}>
      <Txt variant="label">{label}</Txt>
      <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: 6 }} accessibilityRole="radiogroup" accessibilityLabel={label}>
        {options.map((o) => (
          <Pressable key={o.value} onPress={() => onChange(o.value)} accessibilityRole="radio" aria-checked={value === o.value} style={[styles.opt, value === o.value && styles.optOn]}>
            <Txt variant="caption" style={{ color: value === o.value ? '#fff' : theme.color.inkSoft }}>{o.label}</Txt>
          </Pressable>
        ))}
      </View>
    </View>
  );
}

/** Refit a curve with another model or corrected conditions; earlier fits stay in the history. */
export function RefitForm({ c, onDone }: { c: CurveDetail; onDone?: () => void }) {
  const refit = useRefit(c.id);
  const { control, handleSubmit } = useForm<RefitInput>({
    resolver: zodResolver(refitSchema),
    defaultValues: {
      model: 'both',
      idealities: 'fixed',
      temp_c: c.meta.temp_c != null ? String(c.meta.temp_c) : '',
      irradiance_w_m2: c.meta.irradiance_w_m2 != null ? String(c.meta.irradiance_w_m2) : '',
      cells: c.meta.cells != null ? String(c.meta.cells) : '',
      area_cm2: c.meta.area_cm2 != null ? String(c.meta.area_cm2) : '',
    },
  });
  const submit = handleSubmit((v) => refit.mutate(v, { onSuccess: () => onDone?.() }));
  return (
    <View style={{ gap: 12 }} testID="refit-form">
      <Controller control={control} name="model" render={({ field }) => (
        <Choice label="Models" value={(field.value ?? 'both') as 'both' | 'single' | 'double'} onChange={field.onChange} options={[{ value: 'both', label: 'Both' }, { value: 'single', label: 'Single diode' }, { value: 'double', label: 'Double diode' }]} />
      )} />
      <Controller control={control} name="idealities" render={({ field }) => (
        <Choice label="Double-diode ideality factors" value={(field.value ?? 'fixed') as 'fixed' | 'free'} onChange={field.onChange} options={[{ value: 'fixed', label: 'Fixed n1 = 1, n2 = 2' }, { value: 'free', label: 'Free in [1, 2] (slower)' }]} />
      )} />
      <View style={styles.grid}>
        <View style={styles.cell}><TextField control={control} name="temp_c" label={labelWithUnit('temp_c')} keyboardType="numbers-and-punctuation" autoCapitalize="none" /></View>
        <View style={styles.cell}><TextField control={control} name="irradiance_w_m2" label={labelWithUnit('irradiance_w_m2')} keyboardType="numbers-and-punctuation" autoCapitalize="none" /></View>
        <View style={styles.cell}><TextField control={control} name="cells" label={labelWithUnit('cells')} keyboardType="numeric" /></View>
        <View style={styles.cell}><TextField control={control} name="area_cm2" label={labelWithUnit('area_cm2')} keyboardType="numbers-and-punctuation" autoCapitalize="none" /></View>
      </View>
      <FormError error={refit.error} />
      <Button label="Fit again" onPress={submit} busy={refit.isPending} testID="refit-submit" />
    </View>
  );
}

const styles = StyleSheet.create({
  grid: { flexDirection: 'row', flexWrap: 'wrap', gap: 10 },
  cell: { flexGrow: 1, flexBasis: 140, minWidth: 130 },
  opt: { paddingHorizontal: 10, paddingVertical: 5, borderRadius: 999, borderWidth: 1, borderColor: theme.color.line },
  optOn: { backgroundColor: theme.color.ink, borderColor: theme.color.ink },
});
