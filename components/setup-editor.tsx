import { useState } from 'react';
import { Pressable, StyleSheet, TextInput, View } from 'react-native';
import { Button } from '@/components/button';
import { FormError } from '@/components/form-error';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { useSaveSetup } from '@/lib/api/setups';
import type { Setup } from '@/lib/api/setups';
import { readNumber } from '@/lib/schemas/numbers';
import { ACTS_ON, ACTS_ON_WORDS, combineBudget, setupInputSchema, UNIT_OF } from '@/lib/quality/uncertainty';
import type { ActsOn, UncertaintyComponent } from '@/lib/quality/uncertainty';

type Row = { name: string; acts_on: ActsOn; value: string; distribution: 'normal' | 'rectangular'; k: string };

const rowOf = (c: UncertaintyComponent): Row => ({ name: c.name, acts_on: c.acts_on, value: String(c.value), distribution: c.distribution, k: c.k == null ? '' : String(c.k) });
const blank = (): Row => ({ name: '', acts_on: 'pmp', value: '', distribution: 'normal', k: '2' });

/** A typed number ("1,6" too), or NaN when it is not one. */
function num(s: string): number {
  const r = readNumber(s);
  return r === undefined ? Number.NaN : r;
}

/**
 * Edits a measurement setup's uncertainty budget: each component's name, what it acts on (Pmax,
 * Isc or Voc directly in %, or irradiance in % and cell temperature in K), its value and its
 * distribution (normal with its coverage factor k, or rectangular by its half-width). The
 * combined expanded uncertainties (k = 2) are worked out as the person types, with typical
 * crystalline-silicon temperature coefficients (each batch uses its own).
 */
export function SetupEditor({ initial, onSaved, onCancel }: { initial?: Setup; onSaved: (s: Setup) => void; onCancel?: () => void }) {
  const save = useSaveSetup();
  const [name, setName] = useState(initial?.name ?? '');
  const [rows, setRows] = useState<Row[]>(initial ? initial.components.map(rowOf) : [blank()]);
  const [makeDefault, setMakeDefault] = useState(false);
  const [issues, setIssues] = useState<string[]>([]);

  const components = rows.map((r) => ({ name: r.name, acts_on: r.acts_on, value: num(r.value), unit: UNIT_OF[r.acts_on], distribution: r.distribution, ...(r.distribution === 'normal' ? { k: num(r.k) } : {}) }));
  const parsed = setupInputSchema.safeParse({ name, components, ...(makeDefault ? { is_default: true } : {}) });
  const preview = combineBudget(components.filter((c) => Number.isFinite(c.value) && (c.distribution === 'rectangular' || (c.k ?? 0) >= 1)) as UncertaintyComponent[]);
  const set = (i: number, patch: Partial<Row>) => setRows((rs) => rs.map((r, j) => (j === i ? { ...r, ...patch } : r)));

  const submit = () => {
    if (!parsed.success) {
      setIssues(parsed.error.issues.map((x) => `${x.path.length ? `${x.path.map((p) => (typeof p === 'number' ? `row ${p + 1}` : String(p))).join(' ')}: ` : ''}${x.message}`.replace('NaN', 'not a number')));
      return;
    }
    setIssues([]);
    const body = initial ? { id: initial.id, name: parsed.data.name, components: parsed.data.components, ...(makeDefault ? { is_default: true } : {}) } : parsed.data;
    save.mutate(body, { onSuccess: onSaved });
  };

  return (
    <View style={{ gap: 12 }} testID="setup-editor">
      <View style={{ gap: 4 }}>
        <Txt variant="label">Name</Txt>
        <TextInput value={name} onChangeText={setName} style={styles.input} accessibilityLabel="Setup name" testID="setup-name" placeholder="e.g. Line 2 flasher with reference cell RC-7" placeholderTextColor={theme.color.muted} />
      </View>
      <Txt variant="label">Uncertainty components</Txt>
      {rows.map((r, i) => (
        <View key={i} style={styles.row} testID={`setup-row-${i}`}>
          <TextInput value={r.name} onChangeText={(t) => set(i, { name: t })} style={[styles.input, styles.grow]} placeholder="component, e.g. reference cell calibration" placeholderTextColor={theme.color.muted} accessibilityLabel={`Component ${i + 1} name`} testID={`setup-row-${i}-name`} />
          <View style={styles.chips} accessibilityRole="radiogroup" accessibilityLabel={`Component ${i + 1} acts on`}>
            {ACTS_ON.map((a) => (
              <Pressable key={a} onPress={() => set(i, { acts_on: a })} style={[styles.chip, r.acts_on === a && styles.chipOn]} accessibilityRole="radio" aria-checked={r.acts_on === a} testID={`setup-row-${i}-on-${a}`}>
                <Txt variant="caption" style={{ color: r.acts_on === a ? '#fff' : theme.color.inkSoft }}>{ACTS_ON_WORDS[a]}</Txt>
              </Pressable>
            ))}
          </View>
          <View style={styles.chips}>
            {(['normal', 'rectangular'] as const).map((d) => (
              <Pressable key={d} onPress={() => set(i, { distribution: d })} style={[styles.chip, r.distribution === d && styles.chipOn]} accessibilityRole="radio" aria-checked={r.distribution === d} testID={`setup-row-${i}-${d}`}>
                <Txt variant="caption" style={{ color: r.distribution === d ? '#fff' : theme.color.inkSoft }}>{d === 'normal' ? 'normal, U with its k' : 'rectangular, half-width'}</Txt>
              </Pressable>
            ))}
          </View>
          <View style={styles.chips}>
            <TextInput value={r.value} onChangeText={(t) => set(i, { value: t })} style={[styles.input, styles.num]} keyboardType="numeric" placeholder="value" placeholderTextColor={theme.color.muted} accessibilityLabel={`Component ${i + 1} value in ${UNIT_OF[r.acts_on]}`} testID={`setup-row-${i}-value`} />
            <Txt variant="body">{UNIT_OF[r.acts_on]}</Txt>
            {r.distribution === 'normal' ? (
              <>
                <Txt variant="body">k =</Txt>
                <TextInput value={r.k} onChangeText={(t) => set(i, { k: t })} style={[styles.input, styles.small]} keyboardType="numeric" accessibilityLabel={`Component ${i + 1} coverage factor k`} testID={`setup-row-${i}-k`} />
              </>
            ) : null}
            <Button label="Remove" kind="quiet" onPress={() => setRows((rs) => rs.filter((_, j) => j !== i))} />
          </View>
        </View>
      ))}
      <View style={{ flexDirection: 'row' }}>
        <Button label="Add a component" kind="secondary" onPress={() => setRows((rs) => [...rs, blank()])} testID="setup-add-row" />
      </View>
      <View style={styles.preview} testID="setup-preview">
        <Txt variant="label">Expanded uncertainty (k = 2)</Txt>
        <Txt variant="figure">Pmax ±{preview.u_pmp_pct_k2.toFixed(2)} % · Isc ±{preview.u_isc_pct_k2.toFixed(2)} % · Voc ±{preview.u_voc_pct_k2.toFixed(2)} %</Txt>
        <Txt variant="caption">
          Combined as the GUM says: each component's standard uncertainty (U/k for a normal one, half-width/√3 for a rectangular one) times its sensitivity, added in squares, doubled.
          Irradiance acts 1 %/% on Pmax and Isc and 0.05 %/% on Voc; temperature through the batch's α, β and γ (here typical values: 0.05, −0.30, −0.40 %/K).
        </Txt>
      </View>
      {!initial?.is_default ? (
        <Pressable onPress={() => setMakeDefault((v) => !v)} style={[styles.chip, makeDefault && styles.chipOn, { alignSelf: 'flex-start' }]} accessibilityRole="checkbox" aria-checked={makeDefault} testID="setup-make-default">
          <Txt variant="caption" style={{ color: makeDefault ? '#fff' : theme.color.inkSoft }}>Make this the organisation's default setup</Txt>
        </Pressable>
      ) : null}
      {issues.length ? (
        <View style={styles.issues} accessibilityRole="alert" testID="setup-issues">
          {issues.map((m) => (
            <Txt key={m} variant="body" style={{ color: theme.color.danger }}>{m}</Txt>
          ))}
        </View>
      ) : null}
      <FormError error={save.error} />
      <View style={{ flexDirection: 'row', gap: 8, flexWrap: 'wrap' }}>
        <Button label={initial ? 'Save changes' : 'Save setup'} onPress={submit} busy={save.isPending} testID="setup-save" />
        {onCancel ? <Button label="Cancel" kind="quiet" onPress={onCancel} /> : null}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  input: { borderWidth: 1, borderColor: theme.color.line, borderRadius: theme.radius.m, paddingHorizontal: 10, paddingVertical: 7, fontFamily: theme.font.regular, fontSize: 14, color: theme.color.ink, backgroundColor: theme.color.surface },
  grow: { flexGrow: 1, minWidth: 0 },
  num: { width: 92, fontFamily: theme.font.mono },
  small: { width: 56, fontFamily: theme.font.mono },
  row: { gap: 6, paddingBottom: 10, borderBottomWidth: 1, borderBottomColor: theme.color.line },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: 6, alignItems: 'center' },
  chip: { paddingHorizontal: 10, paddingVertical: 5, borderRadius: 999, borderWidth: 1, borderColor: theme.color.line },
  chipOn: { backgroundColor: theme.color.ink, borderColor: theme.color.ink },
  preview: { backgroundColor: theme.color.holeSoft, borderRadius: theme.radius.m, padding: 12, gap: 4 },
  issues: { backgroundColor: theme.color.dangerSoft, borderRadius: theme.radius.m, padding: 10, gap: 4 },
});
