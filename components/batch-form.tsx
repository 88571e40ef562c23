import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { SetupPicker } from '@/components/setup-picker';
import type { SetupChoice } from '@/components/setup-picker';
import { DateField } from '@/components/date-field';
import { FormError } from '@/components/form-error';
import { TextField } from '@/components/text-field';
import type { Batch } from '@/lib/api/batches';
import { Txt } from '@/components/txt';
import { BATCH_STC_LABELS as L, batchCreateSchema } from '@/lib/schemas/curves';
import type { BatchCreateInput } from '@/lib/schemas/curves';
import { labelWithUnit } from '@/lib/vocabulary';

const text = (v: unknown) => (v == null ? '' : String(v));

/** Create or edit a batch's description; the same zod schema checks it on the server. */
export function BatchForm({ initial, submitLabel, busy, error, onSubmit, onCancel, setups }: { initial?: Batch; submitLabel: string; busy: boolean; error: unknown; onSubmit: (v: BatchCreateInput) => void; onCancel?: () => void; /** The organisation's measurement setups; the choice shows when given. */ setups?: readonly SetupChoice[] }) {
  const { control, handleSubmit } = useForm<BatchCreateInput>({
    resolver: zodResolver(batchCreateSchema),
    defaultValues: {
      name: initial?.name ?? '',
      product_type: text(initial?.product_type),
      supplier: text(initial?.supplier),
      line: text(initial?.line),
      lot: text(initial?.lot),
      batch_date: text(initial?.batch_date),
      cells: text(initial?.cells),
      area_cm2: text(initial?.area_cm2),
      nameplate_w: text(initial?.nameplate_w),
      irradiance_w_m2: text(initial?.irradiance_w_m2),
      alpha_pct_per_k: text(initial?.alpha_pct_per_k),
      beta_pct_per_k: text(initial?.beta_pct_per_k),
      gamma_pct_per_k: text(initial?.gamma_pct_per_k),
      rs_ohm: text(initial?.rs_ohm),
      kappa_ohm_per_k: text(initial?.kappa_ohm_per_k),
      // Left out unless chosen, so a form shown before the setups arrive never clears the batch's setup.
      setup_id: initial?.setup_id ?? undefined,
      description: text(initial?.description),
    },
  });
  // The resolver hands back parsed values (numbers, nulls); send those.
  const submit = handleSubmit((v) => onSubmit(v));
  return (
    <View style={{ gap: 12 }} testID="batch-form">
      <TextField control={control} name="name" label="Name" placeholder="e.g. Line 2, lot 2611, 14 Nov" testID="batch-name" />
      <View style={styles.grid}>
        <View style={styles.cell}><TextField control={control} name="product_type" label="Product / cell type" /></View>
        <View style={styles.cell}><TextField control={control} name="supplier" label="Cell supplier" /></View>
        <View style={styles.cell}><TextField control={control} name="line" label="Line" /></View>
        <View style={styles.cell}><TextField control={control} name="lot" label="Lot" /></View>
        <View style={styles.cell}><DateField control={control} name="batch_date" label="Batch date" hint="When the lot was made or measured." testID="batch-date" /></View>
        {/* Labels from the key table, the same words the schema's messages use. */}
        <View style={styles.cell}><TextField control={control} name="cells" label={labelWithUnit('cells')} keyboardType="numeric" hint="Used when a file does not say." /></View>
        <View style={styles.cell}><TextField control={control} name="area_cm2" label={labelWithUnit('area_cm2')} keyboardType="numbers-and-punctuation" autoCapitalize="none" hint="Device area, for efficiency; a unit may follow (244 cm², 1.6 m²)." testID="batch-area" /></View>
        <View style={styles.cell}><TextField control={control} name="nameplate_w" label={labelWithUnit('nameplate_w')} keyboardType="numbers-and-punctuation" autoCapitalize="none" placeholder="e.g. 400 or 0.4 kW" testID="batch-nameplate" /></View>
        <View style={styles.cell}><TextField control={control} name="irradiance_w_m2" label={L.irradiance_w_m2} keyboardType="numbers-and-punctuation" autoCapitalize="none" hint="For efficiency and STC when a file does not say." testID="batch-irradiance" /></View>
      </View>
      <Txt variant="label">Module type's coefficients, for the STC figures</Txt>
      <Txt variant="caption">
        Curves measured within ±2 °C and ±2 % of 25 °C and 1000 W/m² keep their measured figures. Others are corrected by IEC 60891 procedure 1 with α and β (Rs is needed
        off 1000 W/m²; κ is 0 when left empty), or by the fitted model when its own coefficients agree with β and γ. Without them such curves get no STC figures. A number
        may carry its unit (%/K, %/°C or 1/K; Ω or mΩ); the coefficients are relative, so a value in mV/K belongs to the physics page's translation, not here.
      </Txt>
      <View style={styles.grid}>
        <View style={styles.cell}><TextField control={control} name="alpha_pct_per_k" label={L.alpha_pct_per_k} keyboardType="numbers-and-punctuation" autoCapitalize="none" placeholder="e.g. 0.05 or 0.05 %/K" testID="batch-alpha" /></View>
        <View style={styles.cell}><TextField control={control} name="beta_pct_per_k" label={L.beta_pct_per_k} keyboardType="numbers-and-punctuation" autoCapitalize="none" placeholder="e.g. −0.29 or −0.0029 1/K" testID="batch-beta" /></View>
        <View style={styles.cell}><TextField control={control} name="gamma_pct_per_k" label={L.gamma_pct_per_k} keyboardType="numbers-and-punctuation" autoCapitalize="none" placeholder="e.g. −0.37 %/°C" testID="batch-gamma" /></View>
        <View style={styles.cell}><TextField control={control} name="rs_ohm" label={L.rs_ohm} keyboardType="numbers-and-punctuation" autoCapitalize="none" placeholder="e.g. 0.35 or 350 mΩ" testID="batch-rs" /></View>
        <View style={styles.cell}><TextField control={control} name="kappa_ohm_per_k" label={L.kappa_ohm_per_k} keyboardType="numbers-and-punctuation" autoCapitalize="none" testID="batch-kappa" /></View>
      </View>
      {setups ? <SetupPicker control={control} setups={setups} /> : null}
      <TextField control={control} name="description" label="Notes" multiline numberOfLines={3} style={{ minHeight: 70 }} />
      <FormError error={error} />
      <View style={{ flexDirection: 'row', gap: 8, flexWrap: 'wrap' }}>
        <Button label={submitLabel} onPress={submit} busy={busy} testID="batch-submit" />
        {onCancel ? <Button label="Cancel" kind="quiet" onPress={onCancel} /> : null}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  grid: { flexDirection: 'row', flexWrap: 'wrap', gap: 10 },
  cell: { flexGrow: 1, flexBasis: 180, minWidth: 150 },
});
