import { useController } from 'react-hook-form';
import type { Control } from 'react-hook-form';
import { Pressable, StyleSheet, View } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import type { BatchCreateInput } from '@/lib/schemas/curves';

export type SetupChoice = { id: string; name: string; is_default: boolean; u_pmp_pct_k2: number };

/**
 * The measurement setup a batch is measured with: the organisation's default (no setup named) or
 * one of its setups. Its uncertainty budget gives each figure of the batch its ± (k = 2).
 */
export function SetupPicker({ control, setups }: { control: Control<BatchCreateInput>; setups: readonly SetupChoice[] }) {
  const { field } = useController({ control, name: 'setup_id' });
  const chosen = (field.value as string | null | undefined) ?? null;
  const fallback = setups.find((s) => s.is_default);
  const options: { id: string | null; label: string }[] = [
    { id: null, label: fallback ? `Organisation default (${fallback.name})` : 'Organisation default (none yet)' },
    ...setups.map((s) => ({ id: s.id, label: `${s.name} · Pmax ±${s.u_pmp_pct_k2.toFixed(2)} %` })),
  ];
  return (
    <View style={{ gap: 6 }} testID="setup-picker">
      <Txt variant="label">Measurement setup</Txt>
      <Txt variant="caption">Its uncertainty budget gives every Pmax, Isc and Voc of the batch its expanded uncertainty (k = 2).</Txt>
      <View style={styles.row} accessibilityRole="radiogroup">
        {options.map((o) => {
          const on = chosen === o.id;
          return (
            <Pressable key={o.id ?? 'default'} onPress={() => field.onChange(o.id)} style={[styles.chip, on && styles.chipOn]} accessibilityRole="radio" aria-checked={on} testID={`setup-choice-${o.id ?? 'default'}`}>
              <Txt variant="caption" style={{ color: on ? '#fff' : theme.color.inkSoft }}>{o.label}</Txt>
            </Pressable>
          );
        })}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: 6 },
  chip: { paddingHorizontal: 10, paddingVertical: 5, borderRadius: 999, borderWidth: 1, borderColor: theme.color.line, maxWidth: '100%' },
  chipOn: { backgroundColor: theme.color.ink, borderColor: theme.color.ink },
});
