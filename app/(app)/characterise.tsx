import { router, useLocalSearchParams } from 'expo-router';
import { Pressable, StyleSheet, View, useWindowDimensions } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { CoefficientChart, EfficiencyChart } from '@/components/lazy-charts';
import { PowerMatrix } from '@/components/power-matrix';
import { QueryState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { useBatch, useBatches, useUpdateBatch } from '@/lib/api/batches';
import { useCharacterisation } from '@/lib/api/characterisation';
import type { Characterisation } from '@/lib/api/characterisation';
import { toUserMessage } from '@/lib/api/client';
import { useMe } from '@/lib/api/session';

/** Widths of the coefficient table's columns: the relative coefficient with its error needs the most. */
const COLUMN_FLEX = [{ flex: 0.9 }, { flex: 1.7 }, { flex: 1.2 }, { flex: 0.7 }];

const signed = (x: number, d: number) => `${x > 0 ? '+' : x < 0 ? '−' : ''}${Math.abs(x).toFixed(d)}`;
const se = (x: number | null, d: number) => (x == null ? '' : ` ± ${x.toFixed(d)}`);


function Chip({ label, on, onPress, testID }: { label: string; on: boolean; onPress: () => void; testID?: string }) {
  return (
    <Pressable onPress={onPress} accessibilityRole="radio" accessibilityState={{ selected: on }} style={[styles.chip, on && styles.chipOn]} testID={testID}>
      <Txt variant="label" numberOfLines={1} style={on ? { color: theme.color.surface } : undefined}>
        {label}
      </Txt>
    </Pressable>
  );
}

function Coefficients({ c, batchId, batchName }: { c: Characterisation; batchId: string; batchName: string }) {
  const me = useMe();
  const batch = useBatch(batchId);
  const update = useUpdateBatch(batchId);
  const r = c.regression;
  const p1 = c.iec60891.procedure1;
  const rows = [
    ['α, Isc', signed(c.alpha_isc_pct_per_k, 4) + se(c.stderr.alpha_isc_pct_per_k, 4), `${signed(c.alpha_isc_a_per_k * 1000, 3)} mA/K`, r.alpha.r2],
    ['β, Voc', signed(c.beta_voc_pct_per_k, 4) + se(c.stderr.beta_voc_pct_per_k, 4), `${signed(c.beta_voc_v_per_k * 1000, 1)} mV/K`, r.beta.r2],
    ['γ, Pmax', signed(c.gamma_pmp_pct_per_k, 4) + se(c.stderr.gamma_pmp_pct_per_k, 4), `${signed(c.gamma_pmp_w_per_k, 3)} W/K`, r.gamma.r2],
  ] as const;
  const canWrite = !!me.data?.permissions.includes('batch:write');
  const b = batch.data;
  const writable = canWrite && b && b.state !== 'released' && !b.archived;
  const save = () =>
    update.mutate({
      alpha_pct_per_k: Number(c.alpha_isc_pct_per_k.toPrecision(4)),
      beta_pct_per_k: Number(c.beta_voc_pct_per_k.toPrecision(4)),
      gamma_pct_per_k: Number(c.gamma_pmp_pct_per_k.toPrecision(4)),
      ...('error' in p1 ? {} : { rs_ohm: Number(p1.rs_ohm.toPrecision(4)), kappa_ohm_per_k: Number(p1.kappa_ohm_per_k.toPrecision(4)) }),
    } as Parameters<typeof update.mutate>[0]);
  return (
    <Card title="Temperature coefficients" testID="charz-coefficients">
      <Txt variant="caption">
        Least-squares lines over {r.curves} curves at {r.irradiance_wm2.toFixed(0)} W/m², {r.temp_min_c.toFixed(1)} to {r.temp_max_c.toFixed(1)} °C ({r.span_k.toFixed(1)} K). Relative to the line’s value at 25 °C; ± one standard error.
      </Txt>
      <View style={styles.table}>
        <View style={styles.tr}>
          {['Coefficient', '%/K', 'Absolute', 'R²'].map((h, k) => (
            <Txt key={h} variant="caption" style={[styles.td, COLUMN_FLEX[k]]}>
              {h}
            </Txt>
          ))}
        </View>
        {rows.map(([name, rel, abs, r2]) => (
          <View key={name} style={styles.tr}>
            <Txt variant="label" style={[styles.td, COLUMN_FLEX[0]]}>
              {name}
            </Txt>
            <Txt variant="body" style={[styles.td, styles.num, COLUMN_FLEX[1]]}>
              {rel}
            </Txt>
            <Txt variant="body" style={[styles.td, styles.num, COLUMN_FLEX[2]]}>
              {abs}
            </Txt>
            <Txt variant="body" style={[styles.td, styles.num, COLUMN_FLEX[3]]}>
              {r2 == null ? '—' : r2.toFixed(4)}
            </Txt>
          </View>
        ))}
      </View>
      {writable ? (
        <View style={{ gap: 6 }}>
          <Button label={`Use these coefficients for ${batchName}`} numberOfLines={2} busy={update.isPending} onPress={save} testID="charz-save" />
          <Txt variant="caption">
            Saves α, β, γ{'error' in p1 ? '' : ', and procedure 1’s Rs and κ'} on the batch; its curves’ STC figures and the string sizing then use them.
          </Txt>
          {update.isSuccess ? <Txt variant="caption" testID="charz-saved">Saved on {batchName}.</Txt> : null}
          {update.isError ? <Txt variant="caption" style={{ color: theme.color.danger }}>{toUserMessage(update.error)}</Txt> : null}
        </View>
      ) : (
        <Txt variant="caption">
          {canWrite ? 'This batch is released or archived: its coefficients stay as they are.' : 'A test engineer or QA lead can save these coefficients on the batch.'}
        </Txt>
      )}
      {c.notes.map((n) => (
        <Txt key={n} variant="caption">
          {n}
        </Txt>
      ))}
    </Card>
  );
}

function Iec60891({ c }: { c: Characterisation }) {
  const p1 = c.iec60891.procedure1;
  const p2 = c.iec60891.procedure2;
  return (
    <Card title="IEC 60891 correction parameters" testID="charz-iec60891">
      <Txt variant="body">
        {'error' in p1
          ? `Procedure 1: ${p1.error}.`
          : `Procedure 1: Rs ${p1.rs_ohm.toFixed(4)} Ω (from ${p1.rs_curves.length} curves at one temperature, Pmax left over ${p1.rs_residual_pct.toFixed(3)} %), κ ${(p1.kappa_ohm_per_k * 1000).toFixed(3)} mΩ/K (from ${p1.kappa_curves.length} curves at one irradiance, ${p1.kappa_residual_pct.toFixed(3)} %).`}
      </Txt>
      <Txt variant="body">
        {'error' in p2
          ? `Procedure 2: ${p2.error}.`
          : `Procedure 2: a ${p2.a_irradiance.toFixed(4)} (Voc left over ${(p2.a_residual_v * 1000).toFixed(1)} mV), Rs′ ${p2.rs_ohm.toFixed(4)} Ω (${p2.rs_residual_pct.toFixed(3)} %), κ′ ${(p2.kappa_ohm_per_k * 1000).toFixed(3)} mΩ/K (${p2.kappa_residual_pct.toFixed(3)} %).`}
      </Txt>
      <Txt variant="caption">Each parameter is the value for which the curves, corrected to one another’s conditions, agree best in Pmax (a least-squares fit); what is left over says how well the procedure describes this device.</Txt>
    </Card>
  );
}

/** /characterise?batch=&device= — a device type's behaviour across irradiance and temperature, from one device's curves in a batch. */
export default function CharacteriseScreen() {
  const params = useLocalSearchParams<{ batch?: string; device?: string }>();
  const batchId = params.batch ?? '';
  const device = params.device ?? '';
  const batches = useBatches();
  const answer = useCharacterisation(batchId, device);
  const { width } = useWindowDimensions();
  const wide = width >= theme.wideFrom;
  const go = (next: { batch?: string; device?: string }) => router.setParams({ batch: next.batch ?? batchId, device: next.device ?? '' });
  return (
    <Screen
      title="Characterisation"
      subtitle="A module type’s temperature coefficients, IEC 60891 parameters and IEC 61853-1 power matrix, from curves of one device measured at several irradiances and cell temperatures."
      testID="characterise-screen"
    >
      <Card title="Batch">
        <QueryState query={batches} isEmpty={(d) => d.batches.length === 0} empty="No batches yet.">
          {(d) => (
            <View style={styles.chips} accessibilityRole="radiogroup">
              {d.batches.map((b) => (
                <Chip key={b.id} label={b.name} on={b.id === batchId} onPress={() => go({ batch: b.id })} testID={`charz-batch-${b.id}`} />
              ))}
            </View>
          )}
        </QueryState>
      </Card>
      {!batchId ? (
        <Txt variant="body" testID="charz-empty">
          Choose the batch that holds the curves of the device measured at several irradiances and temperatures.
        </Txt>
      ) : (
        <QueryState query={answer}>
          {(a) => (
            <View style={{ gap: 16 }}>
              <Card title="Device">
                <Txt variant="caption">The curves of one device, measured at several irradiances and temperatures. Files without a device line each got their own: then take all curves of the batch.</Txt>
                <View style={styles.chips} accessibilityRole="radiogroup">
                  {a.devices.map((x) => (
                    <Chip key={x.device_id} label={`${x.device_id} (${x.curves})`} on={x.device_id === a.device_id} onPress={() => go({ device: x.device_id })} testID={`charz-device-${x.device_id}`} />
                  ))}
                  {a.devices.length > 1 ? (
                    <Chip label={`All curves of the batch (${a.devices.reduce((n, x) => n + x.curves, 0)})`} on={a.device_id === '*'} onPress={() => go({ device: '*' })} testID="charz-device-all" />
                  ) : null}
                </View>
              </Card>
              {!a.characterisation ? (
                <Card title="No characterisation">
                  <Txt variant="body" testID="charz-reason">
                    {a.reason}
                  </Txt>
                </Card>
              ) : (
                <>
                  <View style={[{ gap: 16 }, wide && { flexDirection: 'row', alignItems: 'flex-start' }]}>
                    <View style={[{ gap: 16 }, wide && { flex: 1 }]}>
                      <Coefficients c={a.characterisation} batchId={a.batch.id} batchName={a.batch.name} />
                      <Iec60891 c={a.characterisation} />
                    </View>
                    <Card title="Figures against cell temperature" style={wide ? { flex: 1 } : undefined}>
                      <CoefficientChart r={a.characterisation.regression} device={a.device_id && a.device_id !== '*' ? a.device_id : a.batch.name} testID="charz-coefficient-chart" />
                    </Card>
                  </View>
                  <View style={[{ gap: 16 }, wide && { flexDirection: 'row', alignItems: 'flex-start' }]}>
                    <Card title="Power matrix (IEC 61853-1)" style={wide ? { flex: 1.3 } : undefined}>
                      <PowerMatrix matrix={a.characterisation.matrix} stcPmp={a.characterisation.stc?.pmp_w ?? null} testID="charz-matrix" />
                      {a.characterisation.stc ? (
                        <Txt variant="body" testID="charz-stc">
                          At STC: Pmax {a.characterisation.stc.pmp_w.toFixed(2)} W, Voc {a.characterisation.stc.voc_v.toFixed(3)} V, Isc {a.characterisation.stc.isc_a.toFixed(3)} A, FF {a.characterisation.stc.ff_pct.toFixed(2)} %.
                        </Txt>
                      ) : (
                        <Txt variant="caption">The curves do not reach 1000 W/m² and 25 °C, so there are no STC figures from them.</Txt>
                      )}
                    </Card>
                    <Card title="Efficiency against irradiance at 25 °C" style={wide ? { flex: 1 } : undefined}>
                      {a.characterisation.efficiency.length > 1 ? (
                        <EfficiencyChart points={a.characterisation.efficiency} device={a.device_id && a.device_id !== '*' ? a.device_id : a.batch.name} testID="charz-efficiency-chart" />
                      ) : (
                        <Txt variant="caption">The matrix has too few points at 25 °C for an efficiency curve.</Txt>
                      )}
                    </Card>
                  </View>
                </>
              )}
            </View>
          )}
        </QueryState>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: 6 },
  chip: { maxWidth: 280, paddingHorizontal: 10, paddingVertical: 6, borderRadius: theme.radius.m, borderWidth: 1, borderColor: theme.color.line, backgroundColor: theme.color.surface },
  chipOn: { backgroundColor: theme.color.ink, borderColor: theme.color.ink },
  table: { gap: 2 },
  tr: { flexDirection: 'row', gap: 8 },
  td: { flex: 1 },
  num: { fontFamily: theme.font.mono, fontSize: 13 },
});
