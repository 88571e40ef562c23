import { useLocalSearchParams, useRouter } from 'expo-router';
import { SpecRuleWords } from '@/components/spec-rule-words';
import { useState } from 'react';
import { View, useWindowDimensions } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { QueryState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { SpecEditor } from '@/components/spec-editor';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { useSpec } from '@/lib/api/quality';
import { useMe } from '@/lib/api/session';
import { fmtParam, formatDateTime, PARAM_LABELS } from '@/lib/format';
import type { ParamKey } from '@/lib/quality/params';

export default function SpecScreen() {
  const { specId } = useLocalSearchParams<{ specId: string }>();
  const spec = useSpec(String(specId));
  const me = useMe();
  const router = useRouter();
  const [editing, setEditing] = useState(false);
  const { width } = useWindowDimensions();
  const wide = width >= theme.wideFrom;
  const canWrite = !!me.data?.permissions.includes('spec:write');
  return (
    <QueryState query={spec}>
      {(s) => {
        const newest = s.versions?.length ? Math.max(...s.versions.map((v) => v.version)) : s.version;
        return (
          <Screen
            title={`${s.name} · version ${s.version}`}
            subtitle={s.version < newest ? `An earlier version: version ${newest} is current.` : 'The current version.'}
            testID="spec-screen"
            actions={canWrite && !editing && s.version === newest ? <Button label="Change limits" onPress={() => setEditing(true)} testID="edit-spec" /> : null}
          >
            {editing ? (
              <Card title="New version">
                <SpecEditor initial={s} onCancel={() => setEditing(false)} onSaved={(n) => { setEditing(false); router.replace(`/specs/${n.id}`); }} />
              </Card>
            ) : null}
            <View style={[{ gap: 16 }, wide && { flexDirection: 'row', alignItems: 'flex-start' }]}>
              <Card title="Limits" style={wide ? { flex: 1.4 } : undefined} testID="spec-limits">
                {Object.keys(s.limits ?? {}).length === 0 ? <Txt variant="body">No parameter limits.</Txt> : null}
                {Object.entries(s.limits ?? {}).map(([k, l]) => (
                  <View key={k} style={{ flexDirection: 'row', gap: 12, borderBottomWidth: 1, borderBottomColor: theme.color.sunken, paddingVertical: 4 }}>
                    <Txt variant="label" style={{ width: 120 }}>{PARAM_LABELS[k as ParamKey]}</Txt>
                    <Txt variant="figure">{l?.min != null ? `≥ ${fmtParam(k, l.min)}` : ''}{l?.min != null && l?.max != null ? '   ' : ''}{l?.max != null ? `≤ ${fmtParam(k, l.max)}` : ''}</Txt>
                  </View>
                ))}
                <Txt variant="body">
                  Power classes: {s.power_classes?.step_w ? `${s.power_classes.step_w} W steps on ${s.power_classes.basis === 'pmp_w' ? 'measured Pmax' : 'Pmax at STC'}, positive-only tolerance` : s.power_classes?.bins ? `${s.power_classes.bins.length} explicit classes` : s.power_classes?.nameplate_bins ? `${s.power_classes.nameplate_bins.length} bins around the nameplate on ${s.power_classes.basis === 'stc_pmp_w' ? 'Pmax at STC' : 'measured Pmax'} (below)` : 'none'}
                </Txt>
                <Txt variant="body">Failing flags: {(s.fail_flags ?? []).join(', ') || 'none'}</Txt>
                <SpecRuleWords spec={s} />
                {s.notes ? <Txt variant="caption">{s.notes}</Txt> : null}
              </Card>
              <Card title="Versions" style={wide ? { flex: 1 } : undefined} testID="spec-versions">
                {(s.versions ?? []).slice().reverse().map((v) => (
                  <View key={v.id} style={{ gap: 2 }}>
                    <Txt variant="label" style={{ color: v.id === s.id ? theme.color.electron : theme.color.inkSoft }} onPress={() => router.push(`/specs/${v.id}`)}>
                      Version {v.version} · {v.by ?? 'unknown'} · {formatDateTime(v.created_at)}
                    </Txt>
                    <Txt variant="caption">{v.changes.join('; ')}</Txt>
                  </View>
                ))}
              </Card>
            </View>
          </Screen>
        );
      }}
    </QueryState>
  );
}
