import { View } from 'react-native';
import { Txt } from '@/components/txt';
import type { SpecJson } from '@/lib/api/quality';
import { DECISION_RULE_WORDS, nameplateBinWords, nameplateLimitWords, NAMEPLATE_PARAMS } from '@/lib/quality/decision-rules';

/** A spec's decision rule, its limits relative to the nameplate and its classes around it, in words. */
export function SpecRuleWords({ spec: s }: { spec: SpecJson }) {
  const rule = s.decision_rule ?? 'simple';
  const rel = NAMEPLATE_PARAMS.flatMap((k) => (s.nameplate_limits?.[k] ? [nameplateLimitWords(k, s.nameplate_limits[k]!)] : []));
  const bins = s.power_classes?.nameplate_bins ?? [];
  return (
    <View style={{ gap: 4 }} testID="spec-rule-words">
      <Txt variant="body">Decision rule: {rule === 'guard_band' ? 'guard band' : 'simple acceptance'} — {DECISION_RULE_WORDS[rule]}.</Txt>
      {rel.map((t) => (
        <Txt key={t} variant="body">{t} (the batch's nameplate power).</Txt>
      ))}
      {bins.length ? (
        <View style={{ gap: 2 }} testID="spec-bin-words">
          <Txt variant="body">Power classes around the batch's nameplate power ({bins.length} {bins.length === 1 ? 'class' : 'classes'}; a device outside them has no class and fails):</Txt>
          {bins.map((b) => (
            <Txt key={b.label} variant="body">· {nameplateBinWords(b, s.power_classes?.basis ?? 'pmp_w')}.</Txt>
          ))}
        </View>
      ) : null}
    </View>
  );
}
