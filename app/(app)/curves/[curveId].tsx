import { useLocalSearchParams, useRouter } from 'expo-router';
import { useMemo, useState } from 'react';
import { StyleSheet, View, useWindowDimensions } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { CautionBlock } from '@/components/caution-block';
import { Figure } from '@/components/figure';
import { FileMetadata } from '@/components/file-metadata';
import { FlagChip } from '@/components/flag-chip';
import { IvChart } from '@/components/lazy-charts';
import type { Series } from '@/components/iv-chart';
import { QueryState } from '@/components/query-state';
import { CurveOriginal } from '@/components/original-file';
import { RefitForm } from '@/components/refit-form';
import { ResidualChart } from '@/components/lazy-charts';
import { Screen } from '@/components/screen';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { compareFits } from '@/lib/analysis/compare-fits';
import { stcBasisText, stcInputRows, stcMethodName } from '@/lib/analysis/stc-words';
import { useCurve } from '@/lib/api/batches';
import type { CurveDetail, FitJson } from '@/lib/api/batches';
import { useMe } from '@/lib/api/session';
import { formatWithUncertainty } from '@/lib/quality/uncertainty';
import { fmtParam, formatDateTime, sig } from '@/lib/format';
import { labelOf } from '@/lib/vocabulary';
import { doubleDiodeCurrent, singleDiodeCurrents } from '@/lib/iv/diode';
import { stcFiguresOf } from '@/lib/schemas/curves';
import { isAboveElv } from '@/lib/strings/cautions';
import { keysToWords } from '@/lib/schemas/field-words';

/** The fitted model's current on an even voltage grid across the measured range. */
function modelSeries(c: CurveDetail, f: FitJson | undefined): Series | null {
  if (!f || !f.converged) return null;
  const cells = Number(f.conditions.cells ?? c.meta.cells ?? 1);
  const temp_c = Number(f.conditions.temp_c ?? c.meta.temp_c ?? 25);
  const v0 = Math.min(0, c.points.voltage_v[0]);
  const v1 = Math.max(...c.points.voltage_v);
  const grid = Array.from({ length: 121 }, (_, k) => v0 + ((v1 - v0) * k) / 120);
  try {
    if (f.model === 'single-diode') {
      return { voltage_v: grid, current_a: singleDiodeCurrents({ iph_a: f.iph_a!, i0_a: f.i0_a!, n: f.n!, rs_ohm: f.rs_ohm!, rsh_ohm: f.rsh_ohm! }, grid, cells, temp_c) };
    }
    const p = { iph_a: f.iph_a!, i01_a: f.i01_a!, n1: f.n1!, i02_a: f.i02_a!, n2: f.n2!, rs_ohm: f.rs_ohm!, rsh_ohm: f.rsh_ohm! };
    return { voltage_v: grid, current_a: grid.map((v) => doubleDiodeCurrent(p, v, cells, temp_c)) };
  } catch {
    return null;
  }
}

/** What the efficiency still needs, in words (the file's or the batch's area and irradiance count). */
function efficiencyNeeds(meta: CurveDetail['meta']): string {
  const missing = [meta.area_cm2 == null ? 'an area' : null, meta.irradiance_w_m2 == null ? 'an irradiance' : null].filter(Boolean);
  return missing.length ? `needs ${missing.join(' and ')} (in the file or on the batch)` : 'not computed';
}

/** The STC figures with their method and inputs in words, or why there are none. */
function StcCard({ c }: { c: CurveDetail }) {
  const stc = stcFiguresOf(c.stc);
  const rows = stcInputRows(c.stc);
  if (!stc) {
    const tried = c.stc?.method === 'none' ? c.stc.tried : [];
    return (
      <View style={{ gap: 6 }} testID="stc-absent">
        <Txt variant="heading">No STC figures</Txt>
        <Txt variant="body">{stcBasisText(c.stc)}</Txt>
        {tried.length > 1 ? tried.map((t) => <Txt key={t} variant="caption">· {t}</Txt>) : null}
        <Txt variant="caption">A spec limit on Pmax at STC fails as not measurable, and no power class is given on it.</Txt>
      </View>
    );
  }
  return (
    <View style={{ gap: 8 }} testID={`stc-${stc.method}`}>
      <View style={styles.figuresPlain}>
        <Figure label="Isc" value={fmtParam('isc_a', stc.isc_a)} />
        <Figure label="Voc" value={fmtParam('voc_v', stc.voc_v)} />
        <Figure label="Pmax" value={formatWithUncertainty('pmp_w', stc.pmp_w, c.uncertainty.u_stc_pmp_w)} testID="stc-pmax" />
        <Figure label="FF" value={fmtParam('ff', stc.ff)} />
        {stc.efficiency != null ? <Figure label="Efficiency" value={fmtParam('efficiency', stc.efficiency)} /> : null}
      </View>
      <Txt variant="label">Method: {stcMethodName(stc)}</Txt>
      <Txt variant="caption">{stcBasisText(stc)}</Txt>
      {rows.length ? (
        <View testID="stc-inputs">
          {rows.map((r) => (
            <View key={r.key} style={styles.paramRow}>
              <Txt variant="caption" style={{ flex: 1 }}>{r.label}</Txt>
              <Txt variant="figure" style={{ fontSize: 13 }}>{r.value}</Txt>
            </View>
          ))}
        </View>
      ) : null}
      {stc.notes.length ? <Txt variant="caption">{stc.notes.join(' ')}</Txt> : null}
    </View>
  );
}

const PARAMS: Record<string, [string, string][]> = {
  'single-diode': [['iph_a', 'Iph'], ['i0_a', 'I0'], ['n', 'n'], ['rs_ohm', 'Rs'], ['rsh_ohm', 'Rsh']],
  'double-diode': [['iph_a', 'Iph'], ['i01_a', 'I01'], ['n1', 'n1'], ['i02_a', 'I02'], ['n2', 'n2'], ['rs_ohm', 'Rs'], ['rsh_ohm', 'Rsh']],
};

function FitColumn({ f, wide }: { f: FitJson; wide: boolean }) {
  const title = f.model === 'single-diode' ? 'Single diode' : `Double diode${f.stderr?.n1 === null && f.stderr?.n2 === null ? ' (n1 = 1, n2 = 2)' : ''}`;
  return (
    <View style={[styles.fitCol, wide && { flex: 1 }]} testID={`fit-${f.model}`}>
      <Txt variant="heading">{title}</Txt>
      {!f.converged ? (
        <Txt variant="body" style={{ color: theme.color.danger }}>Did not converge: {f.message}</Txt>
      ) : (
        <>
          {PARAMS[f.model].map(([k, label]) => {
            const v = (f as unknown as Record<string, number | null>)[k];
            const se = f.stderr?.[k];
            return (
              <View key={k} style={styles.paramRow}>
                <Txt variant="label" style={{ width: 44 }}>{label}</Txt>
                <Txt variant="figure" style={{ flex: 1 }}>{fmtParam(k, v)}</Txt>
                <Txt variant="caption" style={{ fontFamily: theme.font.mono }}>{se != null ? `± ${sig(se, 2)}` : 'fixed / at bound'}</Txt>
              </View>
            );
          })}
          <View style={styles.paramRow}>
            <Txt variant="label" style={{ width: 44 }}>RMSE</Txt>
            <Txt variant="figure" style={{ flex: 1 }}>{fmtParam('rmse_a', f.rmse_a, 4)}</Txt>
            <Txt variant="caption">max {fmtParam('rmse_a', f.max_residual_a, 3)}</Txt>
          </View>
          <Txt variant="caption">{f.evaluations} evaluations · {f.elapsed_ms.toFixed(1)} ms · {f.reason}{f.at_bounds?.length ? ` · at bound: ${f.at_bounds.map(labelOf).join(', ')}` : ''}</Txt>
        </>
      )}
    </View>
  );
}

export default function CurveScreen() {
  const { curveId } = useLocalSearchParams<{ curveId: string }>();
  const curve = useCurve(String(curveId));
  const me = useMe();
  const { width } = useWindowDimensions();
  const wide = width >= theme.wideFrom;
  const [refitting, setRefitting] = useState(false);
  const canWrite = !!me.data?.permissions.includes('batch:write');

  return (
    <QueryState query={curve}>
      {(c) => <CurveBody c={c} wide={wide} canWrite={canWrite && c.batch.state !== 'released'} refitting={refitting} setRefitting={setRefitting} />}
    </QueryState>
  );
}

function CurveBody({ c, wide, canWrite, refitting, setRefitting }: { c: CurveDetail; wide: boolean; canWrite: boolean; refitting: boolean; setRefitting: (v: boolean) => void }) {
  const single = c.fits.find((f) => f.model === 'single-diode');
  const double = c.fits.find((f) => f.model === 'double-diode');
  const singleModel = useMemo(() => modelSeries(c, single), [c, single]);
  const doubleModel = useMemo(() => modelSeries(c, double), [c, double]);
  const comparison = compareFits(single, double, { isc_a: c.metrics.isc_a, flags: c.flags.map((f) => f.code) });
  const mpp = { v: c.metrics.vmp_v, i: c.metrics.imp_a };
  const m = c.metrics;
  const residualSets = [single, double].filter((f): f is FitJson => !!f && f.converged && f.residuals_a.length === c.points.voltage_v.length);
  const conditions = [
    c.meta.temp_c != null ? fmtParam('temp_c', c.meta.temp_c) : '25 °C assumed',
    c.meta.irradiance_w_m2 != null ? fmtParam('irradiance_w_m2', c.meta.irradiance_w_m2) : 'irradiance not given',
    `${c.meta.cells ?? 1} cell${(c.meta.cells ?? 1) === 1 ? '' : 's'} in series`,
    c.meta.area_cm2 != null ? fmtParam('area_cm2', c.meta.area_cm2) : null,
    c.meta.measured_at ? `measured ${formatDateTime(c.meta.measured_at)}` : null,
  ].filter(Boolean);
  const flags = c.flags.filter((f) => f.code !== 'high-voltage');
  const router = useRouter();

  return (
    <Screen
      title={c.device_id}
      subtitle={`${c.file_name} · ${conditions.join(' · ')}`}
      testID="curve-screen"
      actions={
        <View style={{ flexDirection: 'row', gap: 8, flexWrap: 'wrap', maxWidth: '100%' }}>
          <Button label={`‹ ${c.batch.name}`} numberOfLines={1} accessibilityLabel={`Back to batch ${c.batch.name}`} kind="secondary" onPress={() => router.push(`/batches/${c.batch.id}`)} testID="to-batch" />
          <Button label="Physics of this curve" kind="secondary" onPress={() => router.push(`/physics?curve=${c.id}`)} testID="to-physics" />
        </View>
      }
    >
      {isAboveElv(m.voc_v) ? <CautionBlock /> : null}
      {c.status !== 'done' ? (
        <Card title={c.status === 'failed' ? 'Not fitted' : 'Fits on their way'} testID="curve-status">
          <Txt variant="body">
            {c.status === 'queued' ? 'The key figures below are read from the file; the diode fits and STC figures are waiting for a fitting worker.' : c.status === 'fitting' ? 'The diode fits are being computed now; this page shows them when they are stored.' : (c.status_reason ?? 'The diode fits could not be computed.')}
          </Txt>
        </Card>
      ) : null}
      <View style={styles.figures} testID="key-figures">
        <Figure label="Isc" value={formatWithUncertainty('isc_a', m.isc_a, c.uncertainty.u_isc_a)} testID="figure-isc" />
        <Figure label="Voc" value={formatWithUncertainty('voc_v', m.voc_v, c.uncertainty.u_voc_v)} warn={isAboveElv(m.voc_v)} testID="figure-voc" />
        <Figure label="Pmax" value={formatWithUncertainty('pmp_w', m.pmp_w, c.uncertainty.u_pmp_w)} note={`at ${fmtParam('vmp_v', m.vmp_v)}, ${fmtParam('imp_a', m.imp_a)}`} testID="figure-pmax" />
        <Figure label="Fill factor" value={fmtParam('ff', m.ff)} />
        <Figure label="Efficiency" value={fmtParam('efficiency', m.efficiency)} note={m.efficiency == null ? efficiencyNeeds(c.meta) : undefined} />
        <Figure label="Rsh0 · Rs0 (slopes)" value={`${sig(m.rsh0_ohm, 3)} · ${sig(m.rs0_ohm, 3)} Ω`} />
      </View>
      <Txt variant="caption" testID="uncertainty-basis">
        {c.setup
          ? `± is the expanded uncertainty (k = 2) of the measurement setup “${c.setup.name}”: Pmax ±${c.setup.u_pmp_pct_k2.toFixed(2)} %, Isc ±${c.setup.u_isc_pct_k2.toFixed(2)} %, Voc ±${c.setup.u_voc_pct_k2.toFixed(2)} %.`
          : 'No measurement setup is named for this batch and the organisation has no default one, so the figures carry no uncertainty.'}
      </Txt>

      {flags.length ? (
        <Card title="What the curve shows" testID="flags">
          {flags.map((f) => (
            <View key={f.code} style={{ flexDirection: 'row', gap: 10, alignItems: 'flex-start' }}>
              <FlagChip flag={f} />
              <Txt variant="body" style={{ flex: 1 }}>{f.message}</Txt>
            </View>
          ))}
        </Card>
      ) : null}

      <View style={[{ gap: 16 }, wide && { flexDirection: 'row' }]}>
        <Card title="I-V curve" style={wide ? { flex: 1 } : undefined}>
          <IvChart mode="iv" measured={c.points} model={singleModel} second={doubleModel} mpp={mpp} download={c.device_id} testID="iv-chart" />
        </Card>
        <Card title="P-V curve" style={wide ? { flex: 1 } : undefined}>
          <IvChart mode="pv" measured={c.points} model={singleModel} mpp={mpp} download={c.device_id} testID="pv-chart" />
          <Txt variant="caption">Pmax {fmtParam('pmp_w', m.pmp_w)} from a local fit around the highest measured V·I.</Txt>
        </Card>
      </View>

      <Card title="Single diode or double diode?" testID="fit-comparison">
        <View style={[{ gap: 16 }, wide && { flexDirection: 'row' }]}>
          {single ? <FitColumn f={single} wide={wide} /> : null}
          {double ? <FitColumn f={double} wide={wide} /> : null}
        </View>
        {comparison ? (
          <Txt variant="body" testID="fit-verdict">{comparison.sentence}</Txt>
        ) : (
          <Txt variant="body">The two fits cannot be compared: one of them did not converge.</Txt>
        )}
        {residualSets.length ? (
          <ResidualChart voltage_v={c.points.voltage_v} residuals={residualSets.map((f) => f.residuals_a)} labels={residualSets.map((f) => (f.model === 'single-diode' ? 'single diode' : 'double diode'))} download={c.device_id} testID="residual-chart" />
        ) : null}
      </Card>

      <View style={[{ gap: 16 }, wide && { flexDirection: 'row', alignItems: 'flex-start' }]}>
        <Card title="At standard test conditions" style={wide ? { flex: 1 } : undefined} testID="stc">
          <StcCard c={c} />
        </Card>
        <Card title="Fit history" style={wide ? { flex: 1 } : undefined} testID="fit-history">
          {c.history.map((h) => (
            <View key={h.fit_id} style={{ flexDirection: 'row', gap: 8, flexWrap: 'wrap' }}>
              <Txt variant="figure" style={{ fontSize: 12, color: h.current ? theme.color.electron : theme.color.muted }}>{h.current ? 'current' : 'earlier'}</Txt>
              <Txt variant="caption" style={{ flex: 1, minWidth: 200 }}>
                {h.model} · RMSE {fmtParam('rmse_a', h.rmse_a, 3)} · {h.reason} · {formatDateTime(h.created_at)}
              </Txt>
            </View>
          ))}
          {canWrite ? (
            refitting ? (
              <RefitForm c={c} onDone={() => setRefitting(false)} />
            ) : (
              <Button label="Fit again…" kind="secondary" onPress={() => setRefitting(true)} testID="open-refit" />
            )
          ) : null}
        </Card>
      </View>
      <CurveOriginal c={c} canWrite={canWrite} />
      <FileMetadata meta={c.meta} />
      {c.notes.length ? <Txt variant="caption">Reading the file: {c.notes.join('; ')}.</Txt> : null}
    </Screen>
  );
}

const styles = StyleSheet.create({
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: 14, backgroundColor: theme.color.surface, borderRadius: theme.radius.l, borderWidth: 1, borderColor: theme.color.line, padding: 16 },
  figuresPlain: { flexDirection: 'row', flexWrap: 'wrap', gap: 14 },
  // flex: 1 only side by side: in a column it would squash the height and let the verdict overlap.
  fitCol: { minWidth: 260, gap: 6 },
  paramRow: { flexDirection: 'row', alignItems: 'baseline', gap: 8, borderBottomWidth: 1, borderBottomColor: theme.color.sunken, paddingVertical: 3 },
});
