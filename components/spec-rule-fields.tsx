import { Pressable, StyleSheet, TextInput, View } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { DECISION_RULE_WORDS, nameplateLimitWords } from '@/lib/quality/decision-rules';
import type { DecisionRule, NameplateLimit } from '@/lib/quality/decision-rules';
import type { SpecJson } from '@/lib/api/quality';
import { readNumber } from '@/lib/schemas/numbers';

/** The form's state of the decision rule and the Pmax limits relative to the nameplate. */
export type RuleForm = { rule: DecisionRule; below: string; above: string; unit: 'w' | 'pct'; basis: 'pmp_w' | 'stc_pmp_w' };

export function ruleFormOf(s?: SpecJson): RuleForm {
  const basis = s?.nameplate_limits?.stc_pmp_w ? 'stc_pmp_w' : 'pmp_w';
  const rel = s?.nameplate_limits?.[basis];
  const unit = rel && (rel.below_pct !== undefined || rel.above_pct !== undefined) ? 'pct' : 'w';
  const text = (v: number | undefined) => (v === undefined ? '' : String(v));
  return {
    rule: s?.decision_rule ?? 'simple',
    below: text(unit === 'pct' ? rel?.below_pct : rel?.below_w),
    above: text(unit === 'pct' ? rel?.above_pct : rel?.above_w),
    unit,
    basis,
  };
}

/** The spec fields of the form: decision_rule and, when a side is given, nameplate_limits. */
export function ruleFields(f: RuleForm): { decision_rule: DecisionRule; nameplate_limits?: Partial<Record<'pmp_w' | 'stc_pmp_w', NameplateLimit>> } {
  const below = readNumber(f.below);
  const above = readNumber(f.above);
  const rel: NameplateLimit = {};
  if (below !== undefined) rel[f.unit === 'w' ? 'below_w' : 'below_pct'] = below;
  if (above !== undefined) rel[f.unit === 'w' ? 'above_w' : 'above_pct'] = above;
  return { decision_rule: f.rule, ...(Object.keys(rel).length ? { nameplate_limits: { [f.basis]: rel } } : {}) };
}

function Chip({ on, label, onPress, testID, role = 'radio' }: { on: boolean; label: string; onPress: () => void; testID?: string; role?: 'radio' | 'checkbox' }) {
  return (
    <Pressable onPress={onPress} style={[styles.chip, on && styles.chipOn]} accessibilityRole={role} aria-checked={on} testID={testID}>
      <Txt variant="caption" style={{ color: on ? '#fff' : theme.color.inkSoft }}>{label}</Txt>
    </Pressable>
  );
}

/**
 * The decision rule (ILAC-G8: simple acceptance or a guard band of the expanded uncertainty) and
 * the Pmax limits relative to the nameplate, with what they mean in words.
 */
export function SpecRuleFields({ value: f, onChange }: { value: RuleForm; onChange: (f: RuleForm) => void }) {
  const set = (patch: Partial<RuleForm>) => onChange({ ...f, ...patch });
  const fields = ruleFields(f);
  const rel = fields.nameplate_limits?.[f.basis];
  const unitText = f.unit === 'w' ? 'W' : '%';
  return (
    <View style={{ gap: 12 }}>
      <View style={{ gap: 6 }} testID="spec-decision-rule">
        <Txt variant="label">Decision rule</Txt>
        <View style={styles.row}>
          <Chip on={f.rule === 'simple'} label="Simple acceptance" onPress={() => set({ rule: 'simple' })} testID="rule-simple" />
          <Chip on={f.rule === 'guard_band'} label="Guard band (value clears the limit by its uncertainty)" onPress={() => set({ rule: 'guard_band' })} testID="rule-guard-band" />
        </View>
        <Txt variant="caption">{DECISION_RULE_WORDS[f.rule]}. The uncertainty comes from each batch's measurement setup.</Txt>
      </View>
      <View style={{ gap: 6 }} testID="spec-nameplate-limits">
        <Txt variant="label">Limits relative to the nameplate (the batch's nameplate power)</Txt>
        <View style={styles.row}>
          <Chip on={f.basis === 'pmp_w'} label="on measured Pmax" onPress={() => set({ basis: 'pmp_w' })} />
          <Chip on={f.basis === 'stc_pmp_w'} label="on Pmax at STC" onPress={() => set({ basis: 'stc_pmp_w' })} />
          <Chip on={f.unit === 'w'} label="in W" onPress={() => set({ unit: 'w' })} testID="nameplate-unit-w" />
          <Chip on={f.unit === 'pct'} label="in % of the nameplate" onPress={() => set({ unit: 'pct' })} testID="nameplate-unit-pct" />
        </View>
        <View style={styles.row}>
          <Txt variant="body">at least nameplate −</Txt>
          <TextInput value={f.below} onChangeText={(t) => set({ below: t })} style={styles.input} keyboardType="numeric" placeholder="e.g. 0" placeholderTextColor={theme.color.muted} accessibilityLabel={`Below the nameplate by, ${unitText}`} testID="nameplate-below" />
          <Txt variant="body">{unitText}, at most nameplate +</Txt>
          <TextInput value={f.above} onChangeText={(t) => set({ above: t })} style={styles.input} keyboardType="numeric" placeholder="e.g. 5" placeholderTextColor={theme.color.muted} accessibilityLabel={`Above the nameplate by, ${unitText}`} testID="nameplate-above" />
          <Txt variant="body">{unitText}</Txt>
        </View>
        <Txt variant="caption" testID="nameplate-words">
          {rel ? `${nameplateLimitWords(f.basis, rel)}, where the nameplate is the batch's nameplate power; a batch without one fails these devices as not judgeable.` : 'No limit relative to the nameplate.'}
        </Txt>
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: 6, alignItems: 'center' },
  chip: { paddingHorizontal: 10, paddingVertical: 5, borderRadius: 999, borderWidth: 1, borderColor: theme.color.line, maxWidth: '100%' },
  chipOn: { backgroundColor: theme.color.ink, borderColor: theme.color.ink },
  input: { borderWidth: 1, borderColor: theme.color.line, borderRadius: theme.radius.m, paddingHorizontal: 10, paddingVertical: 7, fontFamily: theme.font.mono, fontSize: 14, color: theme.color.ink, backgroundColor: theme.color.surface, width: 80 },
});
