import { useState } from 'react';
import { Pressable, StyleSheet, TextInput, View } from 'react-native';
import { Button } from '@/components/button';
import { SpecClassFields } from '@/components/spec-class-fields';
import { FormError } from '@/components/form-error';
import { ruleFields, ruleFormOf, SpecRuleFields } from '@/components/spec-rule-fields';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { specConflictOf, useSaveSpec } from '@/lib/api/quality';
import type { SpecJson } from '@/lib/api/quality';
import { PARAM_LABELS, unitOf } from '@/lib/format';
import { FLAG_CODES } from '@/lib/iv/flag-codes';
import { PARAM_KEYS } from '@/lib/quality/params';
import type { ParamKey } from '@/lib/quality/params';
import { specIssueMessages } from '@/lib/quality/spec';
import { specSaveSchema } from '@/lib/schemas/quality';
import { powerClassFields } from '@/lib/schemas/power-class-form';
import type { PowerClassForm } from '@/lib/schemas/power-class-form';
import { classFormOf, mergeSpecForms, PERCENT_PARAMS, specFormOf } from '@/lib/schemas/spec-form';
import type { SpecForm } from '@/lib/schemas/spec-form';

const fromForm = (k: ParamKey, s: string) => {
  const t = s.trim().replace(',', '.');
  if (!t) return undefined;
  const n = Number(t);
  return Number.isFinite(n) ? (PERCENT_PARAMS.has(k) ? n / 100 : n) : NaN;
};

/**
 * Edits acceptance limits, power classes and failing flags. Saving makes a new version; the
 * form runs the same zod schema as the server and shows its messages before sending. A save
 * names the version it started from; when someone saved a newer one meanwhile, the editor shows
 * what they changed and offers to load it with this person's edits applied on top.
 */
export function SpecEditor({ initial, onSaved, onCancel }: { initial?: SpecJson; onSaved: (s: SpecJson) => void; onCancel?: () => void }) {
  const save = useSaveSpec();
  const start = specFormOf(initial);
  /** The version this edit is based on: the one opened, or the newer one reloaded after a conflict. */
  const [base, setBase] = useState<SpecJson | undefined>(initial);
  const [name, setName] = useState(start.name);
  const [notes, setNotes] = useState(start.notes);
  const [limits, setLimits] = useState<Record<string, { min: string; max: string }>>(start.limits);
  // Power classes: none, nameplate steps or bins around the nameplate (lib/schemas/power-class-form.ts).
  const [classes, setClasses] = useState<PowerClassForm>(classFormOf(start));
  const [flags, setFlags] = useState<string[]>(start.flags);
  // Decision rule and nameplate-relative limits (kept as typed when a newer version is reloaded).
  const [rule, setRule] = useState(() => ruleFormOf(initial));
  const [issues, setIssues] = useState<string[]>([]);
  const conflict = specConflictOf(save.error);

  /** Loads the newer version with this person's edits (against the old base) applied on top. */
  const reapply = () => {
    if (!conflict) return;
    const mine: SpecForm = { name, notes, limits, flags, ...classes };
    const merged = mergeSpecForms(specFormOf(base), mine, specFormOf(conflict.newer.spec));
    setName(merged.name);
    setNotes(merged.notes);
    setLimits(merged.limits);
    setClasses(classFormOf(merged));
    setFlags(merged.flags);
    setBase(conflict.newer.spec);
    save.reset();
  };

  const submit = () => {
    const lim: Record<string, { min?: number; max?: number }> = {};
    for (const k of PARAM_KEYS) {
      const min = fromForm(k, limits[k].min);
      const max = fromForm(k, limits[k].max);
      if (min !== undefined || max !== undefined) lim[k] = { ...(min !== undefined ? { min } : {}), ...(max !== undefined ? { max } : {}) };
    }
    const pc = powerClassFields(classes);
    const input = {
      name,
      limits: lim,
      ...(pc.power_classes ? { power_classes: pc.power_classes } : {}),
      fail_flags: flags,
      ...ruleFields(rule),
      ...(notes.trim() ? { notes: notes.trim() } : {}),
      ...(base ? { family_id: base.family_id, base_version: base.version } : {}),
    };
    const r = specSaveSchema.safeParse(input);
    // The rows' own messages come first and name the row; the schema's repeat none of them.
    if (!r.success || pc.problems.length) {
      setIssues([...pc.problems, ...(r.success ? [] : specIssueMessages(r.error).map((m) => m.replace('NaN', 'not a number')))]);
      return;
    }
    setIssues([]);
    save.mutate(r.data, { onSuccess: onSaved });
  };

  return (
    <View style={{ gap: 14 }} testID="spec-editor">
      <View style={{ gap: 4 }}>
        <Txt variant="label">Name</Txt>
        <TextInput value={name} onChangeText={setName} style={styles.input} accessibilityLabel="Spec name" testID="spec-name" placeholder="e.g. 60-cell module release" placeholderTextColor={theme.color.muted} />
      </View>
      <View style={{ gap: 6 }}>
        <Txt variant="label">Limits (both inclusive; leave empty for none)</Txt>
        <View style={styles.limitGrid}>
          {PARAM_KEYS.map((k) => (
            <View key={k} style={styles.limitRow}>
              <Txt variant="body" style={{ width: 116 }} numberOfLines={1}>
                {PARAM_LABELS[k]} {unitOf(k) ? `(${unitOf(k)})` : ''}
              </Txt>
              <TextInput value={limits[k].min} onChangeText={(t) => setLimits((l) => ({ ...l, [k]: { ...l[k], min: t } }))} placeholder="min" placeholderTextColor={theme.color.muted} style={[styles.input, styles.num]} keyboardType="numeric" accessibilityLabel={`${PARAM_LABELS[k]} minimum`} testID={`limit-${k}-min`} />
              <TextInput value={limits[k].max} onChangeText={(t) => setLimits((l) => ({ ...l, [k]: { ...l[k], max: t } }))} placeholder="max" placeholderTextColor={theme.color.muted} style={[styles.input, styles.num]} keyboardType="numeric" accessibilityLabel={`${PARAM_LABELS[k]} maximum`} testID={`limit-${k}-max`} />
            </View>
          ))}
        </View>
      </View>
      <SpecRuleFields value={rule} onChange={setRule} />
      <SpecClassFields value={classes} onChange={setClasses} problems={issues} />
      <View style={{ gap: 6 }}>
        <Txt variant="label">Flags that fail a device</Txt>
        <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: 6 }}>
          {Object.entries(FLAG_CODES).map(([code, label]) => {
            const on = flags.includes(code);
            return (
              <Pressable key={code} onPress={() => setFlags((f) => (on ? f.filter((x) => x !== code) : [...f, code]))} style={[styles.chip, on && styles.chipOn]} accessibilityRole="checkbox" aria-checked={on}>
                <Txt variant="caption" style={{ color: on ? '#fff' : theme.color.inkSoft }}>{label}</Txt>
              </Pressable>
            );
          })}
        </View>
      </View>
      <View style={{ gap: 4 }}>
        <Txt variant="label">Notes</Txt>
        <TextInput value={notes} onChangeText={setNotes} multiline style={[styles.input, { minHeight: 60 }]} accessibilityLabel="Notes" />
      </View>
      {issues.length ? (
        <View style={styles.issues} accessibilityRole="alert" testID="spec-issues">
          {issues.map((m) => (
            <Txt key={m} variant="body" style={{ color: theme.color.danger }}>{m}</Txt>
          ))}
        </View>
      ) : null}
      {conflict ? (
        <View style={styles.conflict} accessibilityRole="alert" testID="spec-conflict">
          <Txt variant="label">Version {conflict.newer.version} was saved while you were editing version {base?.version}</Txt>
          <Txt variant="body">What changed since version {base?.version}:</Txt>
          {conflict.newer.changes.map((c) => (
            <Txt key={c} variant="body">· {c}</Txt>
          ))}
          <Txt variant="caption">Reloading shows version {conflict.newer.version} with your own changes applied on top; check it and save again.</Txt>
          <View style={{ flexDirection: 'row' }}>
            <Button label={`Reload version ${conflict.newer.version} and re-apply my changes`} kind="secondary" onPress={reapply} testID="spec-reapply" />
          </View>
        </View>
      ) : (
        <FormError error={save.error} />
      )}
      <View style={{ flexDirection: 'row', gap: 8, flexWrap: 'wrap' }}>
        <Button label={base ? `Save as version ${base.version + 1}` : 'Save spec'} onPress={submit} busy={save.isPending} disabled={!!conflict} testID="spec-save" />
        {onCancel ? <Button label="Cancel" kind="quiet" onPress={onCancel} /> : null}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  input: { borderWidth: 1, borderColor: theme.color.line, borderRadius: theme.radius.m, paddingHorizontal: 10, paddingVertical: 7, fontFamily: theme.font.regular, fontSize: 14, color: theme.color.ink, backgroundColor: theme.color.surface },
  num: { width: 92, fontFamily: theme.font.mono },
  limitGrid: { flexDirection: 'row', flexWrap: 'wrap', columnGap: 24, rowGap: 6 },
  limitRow: { flexDirection: 'row', alignItems: 'center', gap: 8, minWidth: 320 },
  chip: { paddingHorizontal: 10, paddingVertical: 5, borderRadius: 999, borderWidth: 1, borderColor: theme.color.line },
  chipOn: { backgroundColor: theme.color.ink, borderColor: theme.color.ink },
  conflict: { backgroundColor: theme.color.holeSoft, borderRadius: theme.radius.m, padding: 12, gap: 4 },
  issues: { backgroundColor: theme.color.dangerSoft, borderRadius: theme.radius.m, padding: 10, gap: 4 },
});
