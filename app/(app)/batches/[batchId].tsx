import { router, useLocalSearchParams } from 'expo-router';
import { useEffect, useState } from 'react';
import { Pressable, StyleSheet, TextInput, View, useWindowDimensions } from 'react-native';
import { BatchForm } from '@/components/batch-form';
import { useSetups } from '@/lib/api/setups';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { CautionBlock } from '@/components/caution-block';
import { CurveCards } from '@/components/curve-cards';
import { CurveTable } from '@/components/curve-table';
import { Figure } from '@/components/figure';
import { FitProgress } from '@/components/fit-progress';
import { OverlayChart } from '@/components/lazy-charts';
import { QueryState } from '@/components/query-state';
import { BatchOriginals } from '@/components/original-file';
import { ReviewPanel } from '@/components/review-panel';
import { Screen } from '@/components/screen';
import { StateBadge } from '@/components/state-badge';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { UploadPanel } from '@/components/upload-panel';
import { useBatch, useBatchCurves, useCancelFits, useFitStatus, useOverlay, useUpdateBatch } from '@/lib/api/batches';
import type { Batch, CurveListParams } from '@/lib/api/batches';
import { useMe } from '@/lib/api/session';
import { fmtParam } from '@/lib/format';
import { isAboveElv } from '@/lib/strings/cautions';

const PAGE_SIZE = 50;

function Summary({ b }: { b: Batch }) {
  const s = b.summary ?? {};
  const item = (key: string, label: string) => {
    const d = s[key];
    return <Figure key={key} label={`${label} mean`} value={fmtParam(key, d?.mean ?? null)} plusMinus={d?.sd != null ? `${fmtParam(key, d.sd, 2)} (1σ)` : null} note={d ? `${fmtParam(key, d.min, 3)} … ${fmtParam(key, d.max, 3)}` : undefined} />;
  };
  return (
    <View style={styles.figures} testID="batch-summary">
      <Figure label="Curves" value={String(b.curve_count ?? 0)} note={Object.entries(b.flag_counts ?? {}).filter(([k]) => k !== 'temperature-assumed').map(([k, n]) => `${n} ${k}`).join(', ') || 'no warnings'} />
      {item('pmp_w', 'Pmax')}
      {item('voc_v', 'Voc')}
      {item('isc_a', 'Isc')}
      {item('ff', 'FF')}
      {item('rs_ohm', 'Rs')}
    </View>
  );
}

export default function BatchScreen() {
  const { batchId } = useLocalSearchParams<{ batchId: string }>();
  const id = String(batchId);
  const batch = useBatch(id);
  const me = useMe();
  const update = useUpdateBatch(id);
  const overlay = useOverlay(id);
  const fits = useFitStatus(id);
  const cancelFits = useCancelFits(id);
  const [editing, setEditing] = useState(false);
  const setups = useSetups();
  const [search, setSearch] = useState('');
  const [params, setParams] = useState<CurveListParams>({ page: 1, page_size: PAGE_SIZE, sort: 'device_id', dir: 'asc', q: '' });
  const curves = useBatchCurves(id, params);
  const { width } = useWindowDimensions();
  const wide = width >= theme.wideFrom;
  // Phones and narrow windows list the devices as cards; wider screens keep the table.
  const asTable = width >= theme.tableFrom;
  useEffect(() => {
    const t = setTimeout(() => setParams((p) => (p.q === search ? p : { ...p, q: search, page: 1 })), 250);
    return () => clearTimeout(t);
  }, [search]);

  const canWrite = !!me.data?.permissions.includes('batch:write');
  return (
    <QueryState query={batch}>
      {(b) => {
        const writable = canWrite && b.state !== 'released' && !b.archived;
        const highV = (b.summary?.voc_v?.max ?? 0) > 0 && isAboveElv(b.summary?.voc_v?.max ?? 0);
        return (
          <Screen
            title={b.name}
            subtitle={[b.product_type, b.supplier && `supplier ${b.supplier}`, b.line && `line ${b.line}`, b.lot && `lot ${b.lot}`, b.batch_date, b.cells && `${b.cells} cells in series`, b.nameplate_w && `nameplate ${b.nameplate_w} W`].filter(Boolean).join(' · ')}
            testID="batch-screen"
            actions={
              <View style={{ flexDirection: 'row', gap: 8, alignItems: 'center' }}>
                <StateBadge state={b.archived ? 'archived' : b.state} />
                <Button label="Characterise" kind="secondary" onPress={() => router.push({ pathname: '/characterise', params: { batch: b.id } })} testID="batch-characterise" />
                {canWrite && b.state !== 'released' && !editing ? <Button label="Edit details" kind="secondary" onPress={() => setEditing(true)} /> : null}
              </View>
            }
          >
            {editing ? (
              <Card title="Batch details">
                <BatchForm initial={b} setups={setups.data?.setups} submitLabel="Save" busy={update.isPending} error={update.error} onCancel={() => setEditing(false)} onSubmit={(v) => update.mutate(v, { onSuccess: () => setEditing(false) })} />
                <Button
                  label={b.archived ? 'Restore from archive' : 'Archive this batch'}
                  kind="quiet"
                  onPress={() => update.mutate({ archived: !b.archived }, { onSuccess: () => setEditing(false) })}
                />
              </Card>
            ) : null}
            {highV ? <CautionBlock /> : null}
            <Summary b={b} />
            {fits.data ? <FitProgress status={fits.data} canCancel={writable} cancelling={cancelFits.isPending} onCancel={() => cancelFits.mutate()} /> : null}
            <View style={[{ gap: 16 }, wide && { flexDirection: 'row', alignItems: 'flex-start' }]}>
              {writable ? (
                <Card title="Upload curves" style={wide ? { flex: 1 } : undefined}>
                  <UploadPanel batchId={id} />
                </Card>
              ) : null}
              <Card title="All curves on one chart" style={wide ? { flex: 1.3 } : undefined}>
                <QueryState query={overlay} isEmpty={(d) => d.curves.length === 0} empty="No curves yet.">
                  {(d) => (
                    <>
                      <OverlayChart curves={d.curves} batch_name={b.name} testID="overlay-chart" />
                      <Txt variant="caption" testID="overlay-caption">
                        {d.sampled < d.total ? `${d.sampled} of ${d.total} curves drawn, evenly sampled by device id; the counts are of the curves drawn.` : `${d.total} curves.`}{' '}
                        {d.spec ? `Coloured by the result against ${d.spec.name} v${d.spec.version} (the last review decision) and the curves' warnings.` : 'Coloured by the curves’ own flags; no spec has judged this batch yet.'}
                      </Txt>
                    </>
                  )}
                </QueryState>
              </Card>
            </View>
            {me.data ? <ReviewPanel b={b} me={me.data} /> : null}
            <BatchOriginals batchId={b.id} canManage={!!me.data?.permissions.includes('archive:manage')} />
            <Card title="Curves">
              <View style={styles.toolbar}>
                <TextInput
                  value={search}
                  onChangeText={setSearch}
                  placeholder="Search device id"
                  placeholderTextColor={theme.color.muted}
                  style={styles.search}
                  accessibilityLabel="Search device id"
                  testID="curve-search"
                />
                {curves.data ? <Txt variant="caption">{curves.data.total} curve{curves.data.total === 1 ? '' : 's'}</Txt> : null}
              </View>
              <QueryState query={curves} isEmpty={(d) => d.curves.length === 0} empty={params.q ? 'No device id matches.' : 'No curves yet.'}>
                {(d) => {
                  const pages = Math.max(1, Math.ceil(d.total / d.page_size));
                  return (
                    <View style={{ gap: 10 }}>
                      {d.spec ? <Txt variant="caption">Results against {d.spec.name} v{d.spec.version}, the spec of the last review decision; warnings from the curves’ flags.</Txt> : null}
                      {asTable ? (
                        <CurveTable rows={d.curves} sort={params.sort} dir={params.dir} onSort={(sort, dir) => setParams((p) => ({ ...p, sort, dir, page: 1 }))} />
                      ) : (
                        <CurveCards rows={d.curves} sort={params.sort} dir={params.dir} onSort={(sort, dir) => setParams((p) => ({ ...p, sort, dir, page: 1 }))} />
                      )}
                      <View style={styles.pager}>
                        <Pressable disabled={params.page <= 1} onPress={() => setParams((p) => ({ ...p, page: p.page - 1 }))} testID="page-prev">
                          <Txt variant="label" style={{ opacity: params.page <= 1 ? 0.4 : 1 }}>‹ Previous</Txt>
                        </Pressable>
                        <Txt variant="caption">Page {d.page} of {pages}</Txt>
                        <Pressable disabled={params.page >= pages} onPress={() => setParams((p) => ({ ...p, page: p.page + 1 }))} testID="page-next">
                          <Txt variant="label" style={{ opacity: params.page >= pages ? 0.4 : 1 }}>Next ›</Txt>
                        </Pressable>
                      </View>
                    </View>
                  );
                }}
              </QueryState>
            </Card>
          </Screen>
        );
      }}
    </QueryState>
  );
}

const styles = StyleSheet.create({
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: 14, backgroundColor: theme.color.surface, borderRadius: theme.radius.l, borderWidth: 1, borderColor: theme.color.line, padding: 16 },
  toolbar: { flexDirection: 'row', alignItems: 'center', gap: 12, flexWrap: 'wrap' },
  search: {
    flexGrow: 1,
    minWidth: 180,
    maxWidth: 360,
    borderWidth: 1,
    borderColor: theme.color.line,
    borderRadius: theme.radius.m,
    paddingHorizontal: 12,
    paddingVertical: 8,
    fontFamily: theme.font.regular,
    fontSize: 14,
    color: theme.color.ink,
    backgroundColor: theme.color.surface,
  },
  pager: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center' },
});
