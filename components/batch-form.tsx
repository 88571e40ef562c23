import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { DateField } from '@/components/date-field';
import { FormError } from '@/components/form-error';
import { TextField } from '@/components/text-field';
import type { Batch } from '@/lib/api/batches';
import { batchCreateSchema } from '@/lib/schemas/curves';
import type { BatchCreateInput } from '@/lib/schemas/curves';
import { labelWithUnit } from '@/lib/vocabulary';

const text = (v: unknown) => (v == null ? '' : String(v));

/** Create or edit a batch's description; the same zod schema checks it on the server. */
export function BatchForm({ initial, submitLabel, busy, error, onSubmit, onCancel }: { initial?: Batch; submitLabel: string; busy: boolean; error: unknown; onSubmit: (v: BatchCreateInput) => void; onCancel?: () => void }) {
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
        <View style={styles.cell}><TextField control={control} name="area_cm2" label={labelWithUnit('area_cm2')} keyboardType="numeric" hint="Device area, for efficiency." /></View>
        <View style={styles.cell}><TextField control={control} name="nameplate_w" label={labelWithUnit('nameplate_w')} keyboardType="numeric" /></View>
      </View>
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
