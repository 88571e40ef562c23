import { View } from 'react-native';
import { Txt } from '@/components/txt';
import type { Evaluation } from '@/lib/api/quality';
import { DECISION_RULE_WORDS } from '@/lib/quality/decision-rules';

/**
 * The decision rule the spec applies (ILAC-G8) and the setup whose uncertainty the figures carry,
 * in words, beside an evaluation: what "pass" means here and how many devices the measurement
 * cannot place on one side of a limit.
 */
export function DecisionRuleNote({ evaluation: e }: { evaluation: Evaluation }) {
  const n = e.inside_guard_band;
  return (
    <View style={{ gap: 2 }} testID="decision-rule">
      <Txt variant="label">Decision rule: {e.decision_rule === 'guard_band' ? 'guard band' : 'simple acceptance'}</Txt>
      <Txt variant="caption">{DECISION_RULE_WORDS[e.decision_rule]}.</Txt>
      <Txt variant="caption">
        {e.setup
          ? `Uncertainty from the measurement setup “${e.setup.name}”: Pmax ±${e.setup.u_pmp_pct_k2.toFixed(2)} %, Isc ±${e.setup.u_isc_pct_k2.toFixed(2)} %, Voc ±${e.setup.u_voc_pct_k2.toFixed(2)} % (k = 2).`
          : 'No measurement setup: the figures carry no uncertainty, so the guard band is empty.'}
        {' '}
        {n === 0
          ? 'No device lies within its uncertainty of a limit.'
          : `${n} ${n === 1 ? 'device lies' : 'devices lie'} within their uncertainty of a limit${e.decision_rule === 'guard_band' ? ' and fail under the guard-band rule' : ': under the simple rule they pass or fail on the bare value'}.`}
      </Txt>
    </View>
  );
}
