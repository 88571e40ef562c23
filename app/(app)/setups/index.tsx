import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { QueryState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { SetupEditor } from '@/components/setup-editor';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { useSetups } from '@/lib/api/setups';
import type { Setup } from '@/lib/api/setups';
import { useMe } from '@/lib/api/session';
import { ACTS_ON_WORDS } from '@/lib/quality/uncertainty';

/** "Reference cell calibration: irradiance, normal ±1.6 % (k = 2)". */
function componentWords(c: Setup['components'][number]): string {
  const how = c.distribution === 'normal' ? `normal ±${c.value} ${c.unit} (k = ${c.k})` : `rectangular ±${c.value} ${c.unit} half-width`;
  return `${c.name}: ${ACTS_ON_WORDS[c.acts_on]}, ${how}`;
}

/** The organisation's measurement setups and their uncertainty budgets: everyone reads, QA leads edit. */
export default function SetupsScreen() {
  const setups = useSetups();
  const me = useMe();
  const canWrite = !!me.data?.permissions.includes('spec:write');
  const [editing, setEditing] = useState<string | 'new' | null>(null);
  return (
    <Screen
      title="Measurement setups"
      subtitle="A tester with its reference device and sensors, and its uncertainty budget. A batch names its setup (else the default); each of its Pmax, Isc and Voc then carries its expanded uncertainty (k = 2)."
      testID="setups-screen"
      actions={canWrite && editing === null ? <Button label="New setup" onPress={() => setEditing('new')} testID="new-setup" /> : null}
    >
      {editing === 'new' ? (
        <Card title="New setup">
          <SetupEditor onCancel={() => setEditing(null)} onSaved={() => setEditing(null)} />
        </Card>
      ) : null}
      <QueryState query={setups} isEmpty={(d) => d.setups.length === 0} empty={canWrite ? 'No setup yet. Describe your tester’s uncertainty budget; the first setup becomes the default.' : 'No setup yet. QA leads describe them.'}>
        {(d) => (
          <View style={styles.grid}>
            {d.setups.map((s) =>
              editing === s.id ? (
                <Card key={s.id} title={`Edit ${s.name}`} style={styles.wide}>
                  <SetupEditor initial={s} onCancel={() => setEditing(null)} onSaved={() => setEditing(null)} />
                </Card>
              ) : (
                <View key={s.id} style={styles.item} testID={`setup-${s.name}`}>
                  <Txt variant="heading">
                    {s.name} {s.is_default ? <Txt variant="caption">· default</Txt> : null}
                  </Txt>
                  <Txt variant="figure" style={{ fontSize: 13 }}>
                    Pmax ±{s.u_pmp_pct_k2.toFixed(2)} % · Isc ±{s.u_isc_pct_k2.toFixed(2)} % · Voc ±{s.u_voc_pct_k2.toFixed(2)} % (k = 2)
                  </Txt>
                  {s.components.map((c, i) => (
                    <Txt key={i} variant="caption">· {componentWords(c)}</Txt>
                  ))}
                  {canWrite && editing === null ? (
                    <View style={{ flexDirection: 'row' }}>
                      <Button label="Edit" kind="secondary" onPress={() => setEditing(s.id)} testID={`edit-setup-${s.name}`} />
                    </View>
                  ) : null}
                </View>
              ),
            )}
          </View>
        )}
      </QueryState>
    </Screen>
  );
}

const styles = StyleSheet.create({
  grid: { flexDirection: 'row', flexWrap: 'wrap', gap: 12 },
  wide: { flexBasis: '100%' },
  item: { flexGrow: 1, flexBasis: 320, minWidth: 260, backgroundColor: theme.color.surface, borderWidth: 1, borderColor: theme.color.line, borderRadius: theme.radius.l, padding: 14, gap: 4 },
});
