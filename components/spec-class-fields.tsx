import { Pressable, StyleSheet, TextInput, View } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { nameplateBinWords } from '@/lib/quality/decision-rules';
import { powerClassLines } from '@/lib/quality/report-model';
import { readNumber } from '@/lib/schemas/numbers';
import { rowName } from '@/lib/schemas/power-class-form';
import type { BinRow, ClassMode, PowerClassForm } from '@/lib/schemas/power-class-form';

function Chip({ on, label, onPress, testID }: { on: boolean; label: string; onPress: () => void; testID?: string }) {
  return (
    <Pressable onPress={onPress} style={[styles.chip, on && styles.chipOn]} accessibilityRole="radio" aria-checked={on} testID={testID}>
      <Txt variant="caption" style={{ color: on ? '#fff' : theme.color.inkSoft }}>{label}</Txt>
    </Pressable>
  );
}

const MODES: { mode: ClassMode; label: string }[] = [
  { mode: 'none', label: 'No power classes' },
  { mode: 'steps', label: 'Nameplate steps' },
  { mode: 'nameplate_bins', label: 'Bins around the nameplate' },
];

/** One row in words, or what is still missing; a row that cannot be read says so. */
function rowWords(r: BinRow, unit: 'w' | 'pct', basis: 'pmp_w' | 'stc_pmp_w'): string {
  const from = readNumber(r.from);
  const to = readNumber(r.to);
  if (from === undefined || to === undefined || Number.isNaN(from) || Number.isNaN(to) || from >= to) return 'Give a lower end below the upper end to see what this class holds.';
  const label = r.label.trim() || '(no label yet)';
  return unit === 'w' ? `${nameplateBinWords({ label, from_w: from, to_w: to }, basis)}.` : `${nameplateBinWords({ label, from_pct: from, to_pct: to }, basis)}.`;
}

/**
 * Power classes of a spec: none, nameplate steps (class P when P ≤ power < P + step), or bins
 * around the batch's nameplate, a table of (label, from, to) in W or in % of the nameplate with
 * each row in words. The editor checks the rows on saving (lib/schemas/power-class-form.ts) and
 * lists the messages; `problems` are those messages, and the rows they name are marked.
 */
export function SpecClassFields({ value: f, onChange, problems = [] }: { value: PowerClassForm; onChange: (f: PowerClassForm) => void; problems?: string[] }) {
  const faulty = new Set(problems.flatMap((m) => { const n = /^Power class row (\d+)/.exec(m); return n ? [Number(n[1]) - 1] : []; }));
  const set = (patch: Partial<PowerClassForm>) => onChange({ ...f, ...patch });
  const setRow = (i: number, patch: Partial<BinRow>) => set({ rows: f.rows.map((r, j) => (j === i ? { ...r, ...patch } : r)) });
  const unitText = f.unit === 'w' ? 'W' : '%';
  const chooseMode = (mode: ClassMode) => set({ mode, ...(mode === 'nameplate_bins' && !f.rows.length ? { rows: [{ label: '', from: '', to: '' }] } : {}) });
  return (
    <View style={{ gap: 8 }} testID="spec-power-classes">
      <Txt variant="label">Power classes</Txt>
      <View style={styles.row}>
        {MODES.map((m) => (
          <Chip key={m.mode} on={f.mode === m.mode} label={m.label} onPress={() => chooseMode(m.mode)} testID={`class-mode-${m.mode}`} />
        ))}
        {f.kept ? <Chip on={f.mode === 'kept'} label="Keep the saved classes" onPress={() => set({ mode: 'kept' })} testID="class-mode-kept" /> : null}
      </View>
      {f.mode !== 'none' && f.mode !== 'kept' ? (
        <View style={styles.row}>
          <Txt variant="body">Classed on</Txt>
          <Chip on={f.basis === 'stc_pmp_w'} label="Pmax at STC" onPress={() => set({ basis: 'stc_pmp_w' })} testID="class-basis-stc" />
          <Chip on={f.basis === 'pmp_w'} label="measured Pmax" onPress={() => set({ basis: 'pmp_w' })} testID="class-basis-measured" />
        </View>
      ) : null}
      {f.mode === 'kept' ? (
        <Txt variant="caption" testID="class-kept">
          This version's classes {f.kept?.bins ? `are ${f.kept.bins.length} ${f.kept.bins.length === 1 ? 'bin' : 'bins'} in absolute watts` : 'mix W and % of the nameplate'}, which this editor cannot show as a table; they are saved again unchanged. Choose another option to replace them.
        </Txt>
      ) : null}
      {f.mode === 'steps' ? (
        <View style={{ gap: 4 }}>
          <View style={styles.row}>
            <TextInput value={f.step} onChangeText={(t) => set({ step: t })} placeholder="step (W), e.g. 5" placeholderTextColor={theme.color.muted} style={[styles.input, { width: 150 }]} keyboardType="numeric" accessibilityLabel="Power class step in W" testID="class-step" />
          </View>
          {f.stepExtras ? (
            <View testID="class-step-words">
              {powerClassLines({ step_w: readNumber(f.step) || 0, basis: f.basis, ...f.stepExtras })
                .filter((l, i) => i > 0 || (readNumber(f.step) ?? 0) > 0)
                .map((l) => (
                <Txt key={l} variant="caption">{l}</Txt>
              ))}
              <Txt variant="caption">Set through the API; saved again with the step.</Txt>
            </View>
          ) : (
            <Txt variant="caption">Nameplates at multiples of the step, positive-only tolerance: class P when P ≤ power &lt; P + step.</Txt>
          )}
        </View>
      ) : null}
      {f.mode === 'nameplate_bins' ? (
        <View style={{ gap: 8 }}>
          <View style={styles.row}>
            <Txt variant="body">Ends given</Txt>
            <Chip on={f.unit === 'w'} label="in W from the nameplate" onPress={() => set({ unit: 'w' })} testID="bin-unit-w" />
            <Chip on={f.unit === 'pct'} label="in % of the nameplate" onPress={() => set({ unit: 'pct' })} testID="bin-unit-pct" />
          </View>
          <Txt variant="caption">
            A device is in a class when from ≤ its power − the batch's nameplate &lt; to (negative: below the nameplate). A batch without a nameplate power classes no device.
          </Txt>
          {f.rows.map((r, i) => {
            const name = rowName(i, '');
            return (
              <View key={i} style={[styles.binRow, faulty.has(i) && styles.binRowFaulty]} testID={`bin-row-${i}`} aria-invalid={faulty.has(i) || undefined}>
                <View style={styles.row}>
                  <TextInput value={r.label} onChangeText={(t) => setRow(i, { label: t })} placeholder="label, e.g. A" placeholderTextColor={theme.color.muted} style={[styles.input, { width: 120 }]} accessibilityLabel={`${name} label`} testID={`bin-row-${i}-label`} />
                  <View style={styles.row}>
                    <Txt variant="body">from</Txt>
                    <TextInput value={r.from} onChangeText={(t) => setRow(i, { from: t })} placeholder="e.g. 0" placeholderTextColor={theme.color.muted} style={[styles.input, styles.num]} keyboardType="numeric" accessibilityLabel={`${name} from, ${unitText}`} testID={`bin-row-${i}-from`} />
                    <Txt variant="body">to</Txt>
                    <TextInput value={r.to} onChangeText={(t) => setRow(i, { to: t })} placeholder="e.g. 5" placeholderTextColor={theme.color.muted} style={[styles.input, styles.num]} keyboardType="numeric" accessibilityLabel={`${name} to, ${unitText}`} testID={`bin-row-${i}-to`} />
                    <Txt variant="body">{unitText}</Txt>
                  </View>
                  <Pressable onPress={() => set({ rows: f.rows.filter((_, j) => j !== i) })} accessibilityRole="button" accessibilityLabel={`Remove ${name.toLowerCase()}`} style={styles.remove} testID={`bin-row-${i}-remove`}>
                    <Txt variant="caption" style={{ color: theme.color.danger }}>Remove</Txt>
                  </Pressable>
                </View>
                <Txt variant="caption" testID={`bin-row-${i}-words`}>{rowWords(r, f.unit, f.basis)}</Txt>
              </View>
            );
          })}
          <View style={styles.row}>
            <Pressable onPress={() => set({ rows: [...f.rows, { label: '', from: f.rows.length ? f.rows[f.rows.length - 1].to : '', to: '' }] })} accessibilityRole="button" style={styles.add} testID="bin-add">
              <Txt variant="caption" style={{ color: theme.color.electron }}>+ Add a class</Txt>
            </Pressable>
          </View>
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: 6, alignItems: 'center', maxWidth: '100%' },
  binRow: { gap: 4, paddingVertical: 6, borderBottomWidth: 1, borderBottomColor: theme.color.sunken },
  binRowFaulty: { borderLeftWidth: 3, borderLeftColor: theme.color.danger, paddingLeft: 8 },
  chip: { paddingHorizontal: 10, paddingVertical: 5, borderRadius: 999, borderWidth: 1, borderColor: theme.color.line, maxWidth: '100%' },
  chipOn: { backgroundColor: theme.color.ink, borderColor: theme.color.ink },
  input: { borderWidth: 1, borderColor: theme.color.line, borderRadius: theme.radius.m, paddingHorizontal: 10, paddingVertical: 7, fontFamily: theme.font.regular, fontSize: 14, color: theme.color.ink, backgroundColor: theme.color.surface },
  num: { width: 80, fontFamily: theme.font.mono },
  remove: { paddingHorizontal: 8, paddingVertical: 6 },
  add: { paddingHorizontal: 10, paddingVertical: 6, borderRadius: theme.radius.m, borderWidth: 1, borderColor: theme.color.line },
});
