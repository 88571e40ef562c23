import { Link, useRouter } from 'expo-router';
import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { BatchForm } from '@/components/batch-form';
import { useSetups } from '@/lib/api/setups';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { QueryState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { StateBadge } from '@/components/state-badge';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { useBatches, useCreateBatch } from '@/lib/api/batches';
import { useMe } from '@/lib/api/session';
import { fmtParam } from '@/lib/format';

export default function BatchesScreen() {
  const batches = useBatches();
  const me = useMe();
  const create = useCreateBatch();
  const router = useRouter();
  const [creating, setCreating] = useState(false);
  const setups = useSetups();
  const [showArchived, setShowArchived] = useState(false);
  const canWrite = !!me.data?.permissions.includes('batch:write');
  return (
    <Screen
      title="Batches"
      subtitle="Each batch is one lot measured together. Open one to upload curves, read the table and the fits."
      testID="batches-screen"
      actions={canWrite && !creating ? <Button label="New batch" onPress={() => setCreating(true)} testID="new-batch" /> : null}
    >
      {creating ? (
        <Card title="New batch">
          <BatchForm
            submitLabel="Create batch"
            setups={setups.data?.setups}
            busy={create.isPending}
            error={create.error}
            onCancel={() => setCreating(false)}
            onSubmit={(v) => create.mutate(v, { onSuccess: (b) => { setCreating(false); router.push(`/batches/${b.id}`); } })}
          />
        </Card>
      ) : null}
      <QueryState query={batches} isEmpty={(d) => d.batches.length === 0} empty={canWrite ? 'No batches yet. Create one, then upload its I-V files.' : 'No batches yet.'}>
        {(d) => {
          const list = d.batches.filter((b) => showArchived || !b.archived);
          const archived = d.batches.length - d.batches.filter((b) => !b.archived).length;
          return (
            <View style={{ gap: 10 }}>
              <View style={styles.grid}>
                {list.map((b) => (
                  <Link key={b.id} href={`/batches/${b.id}`} asChild>
                    <Pressable style={StyleSheet.flatten([styles.item])} testID={`batch-${b.name}`}>
                      <View style={{ flexDirection: 'row', justifyContent: 'space-between', gap: 8, alignItems: 'flex-start' }}>
                        <Txt variant="heading" style={{ flex: 1 }} numberOfLines={2}>{b.name}</Txt>
                        <StateBadge state={b.archived ? 'archived' : b.state} />
                      </View>
                      <Txt variant="caption" numberOfLines={1}>
                        {[b.product_type, b.supplier, b.line && `line ${b.line}`, b.batch_date].filter(Boolean).join(' · ') || 'No description'}
                      </Txt>
                      <View style={{ flexDirection: 'row', gap: 16 }}>
                        <Txt variant="figure">{b.curve_count ?? 0} curves</Txt>
                        <Txt variant="figure">mean Pmax {fmtParam('pmp_w', b.mean_pmp_w ?? null)}</Txt>
                      </View>
                    </Pressable>
                  </Link>
                ))}
              </View>
              {archived ? (
                <Pressable onPress={() => setShowArchived((s) => !s)}>
                  <Txt variant="label" style={{ textDecorationLine: 'underline' }}>{showArchived ? 'Hide archived batches' : `Show ${archived} archived batch${archived === 1 ? '' : 'es'}`}</Txt>
                </Pressable>
              ) : null}
            </View>
          );
        }}
      </QueryState>
    </Screen>
  );
}

const styles = StyleSheet.create({
  grid: { flexDirection: 'row', flexWrap: 'wrap', gap: 12 },
  item: {
    flexGrow: 1,
    flexBasis: 320,
    minWidth: 260,
    backgroundColor: theme.color.surface,
    borderWidth: 1,
    borderColor: theme.color.line,
    borderRadius: theme.radius.l,
    padding: 14,
    gap: 6,
  },
});
