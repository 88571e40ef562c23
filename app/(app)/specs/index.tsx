import { Link, useRouter } from 'expo-router';
import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { QueryState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { SpecEditor } from '@/components/spec-editor';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { useSpecs } from '@/lib/api/quality';
import { useMe } from '@/lib/api/session';
import { PARAM_LABELS, fmtParam } from '@/lib/format';
import type { ParamKey } from '@/lib/quality/params';

export default function SpecsScreen() {
  const specs = useSpecs();
  const me = useMe();
  const router = useRouter();
  const [creating, setCreating] = useState(false);
  const canWrite = !!me.data?.permissions.includes('spec:write');
  return (
    <Screen
      title="Acceptance specs"
      subtitle="Limits per parameter, power classes and failing flags. Every save is a new version; a batch is judged against one version."
      testID="specs-screen"
      actions={canWrite && !creating ? <Button label="New spec" onPress={() => setCreating(true)} testID="new-spec" /> : null}
    >
      {creating ? (
        <Card title="New spec">
          <SpecEditor onCancel={() => setCreating(false)} onSaved={(s) => { setCreating(false); router.push(`/specs/${s.id}`); }} />
        </Card>
      ) : null}
      <QueryState query={specs} isEmpty={(d) => d.specs.length === 0} empty={canWrite ? 'No spec yet. Create the first one.' : 'No spec yet. QA leads create them.'}>
        {(d) => (
          <View style={styles.grid}>
            {d.specs.map((s) => (
              <Link key={s.id} href={`/specs/${s.id}`} asChild>
                <Pressable style={StyleSheet.flatten([styles.item])} testID={`spec-${s.name}`}>
                  <Txt variant="heading">{s.name} <Txt variant="caption">v{s.version}</Txt></Txt>
                  {Object.entries(s.limits ?? {}).map(([k, l]) => (
                    <Txt key={k} variant="figure" style={{ fontSize: 13 }}>
                      {PARAM_LABELS[k as ParamKey]}: {l?.min != null ? fmtParam(k, l.min) : '−∞'} … {l?.max != null ? fmtParam(k, l.max) : '+∞'}
                    </Txt>
                  ))}
                  <Txt variant="caption">
                    {s.power_classes?.step_w ? `${s.power_classes.step_w} W classes · ` : s.power_classes?.nameplate_bins ? `${s.power_classes.nameplate_bins.length} classes around the nameplate · ` : ''}fails on: {(s.fail_flags ?? []).join(', ') || 'no flag'}
                  </Txt>
                </Pressable>
              </Link>
            ))}
          </View>
        )}
      </QueryState>
    </Screen>
  );
}

const styles = StyleSheet.create({
  grid: { flexDirection: 'row', flexWrap: 'wrap', gap: 12 },
  item: { flexGrow: 1, flexBasis: 320, minWidth: 260, backgroundColor: theme.color.surface, borderWidth: 1, borderColor: theme.color.line, borderRadius: theme.radius.l, padding: 14, gap: 4 },
});
