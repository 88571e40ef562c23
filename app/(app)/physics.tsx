import { Redirect, useLocalSearchParams, useRouter } from 'expo-router';
import { useEffect, useMemo, useState } from 'react';
import type { ReactNode } from 'react';
import { StyleSheet, View, useWindowDimensions } from 'react-native';
import { BandDiagram } from '@/components/band-diagram';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { CautionBlock } from '@/components/caution-block';
import { Figure } from '@/components/figure';
import { PhysicsChoice } from '@/components/physics-choice';
import { PhysicsNiChart } from '@/components/physics-ni-chart';
import { PhysicsOccupationChart } from '@/components/physics-occupation-chart';
import { PhysicsStepper } from '@/components/physics-stepper';
import { PhysicsTranslateForm } from '@/components/physics-translate-form';
import { PhysicsVocChart } from '@/components/physics-voc-chart';
import { QueryState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { useBandDiagram, useCurvePhysics, useMaterial } from '@/lib/api/physics';
import type { BandDiagramJson, CurvePhysicsJson, MaterialJson } from '@/lib/api/physics';
import { useMe } from '@/lib/api/session';
import { can } from '@/lib/auth/roles';
import { fmtParam, sig } from '@/lib/format';
import { ZERO_C_IN_K } from '@/lib/physics/constants';
import { bandDiagramSchema } from '@/lib/schemas/physics';
import type { BandDiagramRequest } from '@/lib/schemas/physics';
import { isAboveElv } from '@/lib/strings/cautions';

/** Temperatures the steppers stay within, K (the silicon model's range; the server checks too). */
const TEMP_LIMITS_K = { min: 150, max: 500 };
const TEMP_STEP = 5;
/** Density steppers run through 1-2-5 values between these, cm⁻³; below the lowest comes 0. */
const DENSITY_LIMITS = { min: 1e8, max: 1e21 };

function readNumber(text: string): number {
  const t = text.trim().replace(/\s+/g, '').replace(',', '.');
  return t === '' ? Number.NaN : Number(t);
}

/** The next value of the 1-2-5 series up or down from x (0 below the lowest step). */
function step125(x: number, dir: -1 | 1): number {
  if (!(x > 0)) return dir > 0 ? DENSITY_LIMITS.min : 0;
  const e = Math.floor(Math.log10(x));
  const candidates: number[] = [];
  for (let k = e - 1; k <= e + 1; k++) for (const m of [1, 2, 5]) candidates.push(m * 10 ** k);
  const next = dir > 0 ? candidates.find((c) => c > x * (1 + 1e-9)) : [...candidates].reverse().find((c) => c < x * (1 - 1e-9));
  if (next === undefined) return x;
  if (next < DENSITY_LIMITS.min * (1 - 1e-9)) return 0;
  return Math.min(DENSITY_LIMITS.max, next);
}

/** "2e16" for 2×10¹⁶: what a person would type. */
function densityText(x: number): string {
  if (x === 0) return '0';
  const e = Math.floor(Math.log10(x) + 1e-9);
  const m = Number((x / 10 ** e).toPrecision(3));
  return `${m}e${e}`;
}

const cm3 = (x: number | null | undefined) => (x == null ? '—' : `${sig(x, 3)} cm⁻³`);
const eV = (x: number, digits = 4) => `${x.toFixed(digits)} eV`;
const mV = (x_V: number) => `${x_V >= 0 ? '+' : '−'}${Math.abs(x_V * 1000) >= 0.01 ? Math.abs(x_V * 1000).toFixed(2) : sig(Math.abs(x_V * 1000), 2)} mV`;

/** The value after it has stopped changing for `ms` (typing should not send a request per key). */
function useSettled<T>(value: T, ms = 250): T {
  const [settled, setSettled] = useState(value);
  const key = JSON.stringify(value);
  useEffect(() => {
    const t = setTimeout(() => setSettled(value), ms);
    return () => clearTimeout(t);
  }, [key, ms]);
  return settled;
}

/** Side by side from `wide` width, stacked on a phone. */
function Columns({ wide, children, align = 'flex-start' }: { wide: boolean; children: ReactNode; align?: 'flex-start' | 'stretch' }) {
  return <View style={[{ gap: 16 }, wide && { flexDirection: 'row', alignItems: align }]}>{children}</View>;
}

export default function PhysicsScreen() {
  const me = useMe();
  const params = useLocalSearchParams<{ curve?: string }>();
  const curveId = typeof params.curve === 'string' && params.curve ? params.curve : null;
  const { width } = useWindowDimensions();
  const wide = width >= theme.wideFrom;
  if (me.data && !can(me.data.role, 'physics:use')) return <Redirect href="/" />;
  return (
    <Screen
      title="Device physics"
      subtitle="Crystalline silicon: carrier statistics (Fermi–Dirac, Boltzmann beside it), quasi-Fermi levels and what a fitted curve says about its recombination."
      testID="physics-screen"
    >
      {curveId ? <CurveSection id={curveId} wide={wide} /> : null}
      <Explorer wide={wide} />
    </Screen>
  );
}

// ---- the explorer: temperature, doping, injection ------------------------------------------

function Explorer({ wide }: { wide: boolean }) {
  const [unit, setUnit] = useState<'K' | 'C'>('K');
  const [tempText, setTempText] = useState('300');
  const [type, setType] = useState<'p' | 'n'>('p');
  const [dopingText, setDopingText] = useState('1e16');
  const [excessText, setExcessText] = useState('1e15');
  const [scale, setScale] = useState<'log' | 'linear'>('log');

  const tempValue = readNumber(tempText);
  const tempK = Number.isFinite(tempValue) ? (unit === 'K' ? tempValue : tempValue + ZERO_C_IN_K) : null;
  const tempError = tempK == null ? `Write the temperature as a number in ${unit === 'K' ? 'kelvin' : '°C'}.` : null;

  const parsed = bandDiagramSchema.safeParse({ type, doping_cm3: dopingText, excess_cm3: excessText, tempK: tempK ?? Number.NaN });
  const fieldError = (name: string) => (parsed.success ? null : (parsed.error.issues.find((i) => i.path[0] === name)?.message ?? null));
  const settledRequest = useSettled<BandDiagramRequest | null>(parsed.success && tempK != null ? parsed.data : null);
  const settledTempK = useSettled(tempK);
  const material = useMaterial(settledTempK);
  const diagram = useBandDiagram(settledRequest);

  const setUnitKeepingValue = (u: 'K' | 'C') => {
    if (u === unit) return;
    if (tempK != null) setTempText(String(Number((u === 'K' ? tempK : tempK - ZERO_C_IN_K).toFixed(2))));
    setUnit(u);
  };
  const stepTemp = (dir: -1 | 1) => {
    const k = Math.min(TEMP_LIMITS_K.max, Math.max(TEMP_LIMITS_K.min, (tempK ?? 300) + dir * TEMP_STEP));
    setTempText(String(Number((unit === 'K' ? k : k - ZERO_C_IN_K).toFixed(2))));
  };
  const stepDensity = (text: string, set: (t: string) => void, dir: -1 | 1) => {
    const x = readNumber(text);
    set(densityText(step125(Number.isFinite(x) ? x : 0, dir)));
  };
  const dopingNote = (() => {
    const x = readNumber(dopingText);
    return Number.isFinite(x) ? `${sig(x, 3)} cm⁻³ ${type === 'p' ? 'acceptors' : 'donors'}${x === 0 ? ' (intrinsic)' : ''}` : undefined;
  })();
  const excessNote = (() => {
    const x = readNumber(excessText);
    return Number.isFinite(x) ? (x === 0 ? 'Δn = 0: in the dark, E_Fn = E_Fp = E_F' : `Δn = Δp = ${sig(x, 3)} cm⁻³`) : undefined;
  })();

  const controls = (
    <Card title="Material and injection" testID="physics-controls">
      <View style={styles.controls}>
        <View style={styles.controlCell}>
          <PhysicsChoice
            label="Temperature unit"
            value={unit}
            onChange={setUnitKeepingValue}
            options={[
              { value: 'K', label: 'kelvin (K)' },
              { value: 'C', label: 'Celsius (°C)' },
            ]}
            testID="temp-unit"
          />
          <PhysicsStepper
            label="Temperature"
            unit={unit === 'K' ? 'K' : '°C'}
            value={tempText}
            onChangeText={setTempText}
            onStep={stepTemp}
            error={tempError}
            note={tempK != null ? (unit === 'K' ? `= ${(tempK - ZERO_C_IN_K).toFixed(2)} °C` : `= ${tempK.toFixed(2)} K`) : undefined}
            testID="temp"
          />
        </View>
        <View style={styles.controlCell}>
          <PhysicsChoice
            label="Doping type"
            value={type}
            onChange={setType}
            options={[
              { value: 'p', label: 'p-type (acceptors)' },
              { value: 'n', label: 'n-type (donors)' },
            ]}
            testID="doping-type"
          />
          <PhysicsStepper label="Doping density" unit="cm⁻³" value={dopingText} onChangeText={setDopingText} onStep={(d) => stepDensity(dopingText, setDopingText, d)} error={fieldError('doping_cm3')} note={dopingNote} testID="doping" />
        </View>
        <View style={styles.controlCell}>
          <PhysicsStepper label="Excess carrier density (injection)" unit="cm⁻³" value={excessText} onChangeText={setExcessText} onStep={(d) => stepDensity(excessText, setExcessText, d)} error={fieldError('excess_cm3')} note={excessNote} testID="excess" />
        </View>
      </View>
      <Txt variant="caption">Steps: 5 K; densities through 1, 2, 5 × 10ⁿ. Type values such as 3.3e15. Dopants fully ionised, no band-gap narrowing.</Txt>
    </Card>
  );

  const splitting = (
    <Card title="Quasi-Fermi-level splitting" testID="splitting-card">
      <QueryState query={diagram}>{(d) => <Splitting d={d} />}</QueryState>
    </Card>
  );

  const band = (
    <Card title="Band diagram" testID="band-card">
      <QueryState query={diagram}>
        {(d) => (
          <>
            <BandDiagram levels={d.diagram.levels} splitting_eV={d.diagram.splitting_eV} testID="band-diagram" />
            <Txt variant="caption">
              Energies in eV from the intrinsic level Ei; Ec − Ev = {eV(d.material.egDos_eV, 3)} (the gap implied by n_i). {d.input.type}-type {sig(d.input.doping_cm3, 3)} cm⁻³ at {d.input.tempK.toFixed(1)} K.
            </Txt>
          </>
        )}
      </QueryState>
    </Card>
  );

  const occupation = (
    <Card title="Occupation f(E) around the band edges" testID="occupation-card">
      <PhysicsChoice
        label="Scale"
        value={scale}
        onChange={setScale}
        options={[
          { value: 'log', label: 'logarithmic' },
          { value: 'linear', label: 'linear' },
        ]}
        testID="occupation-scale"
      />
      <QueryState query={diagram}>
        {(d) => (
          <>
            <PhysicsOccupationChart occupation={d.occupation} scale={scale} testID="occupation-chart" />
            <Txt variant="caption">
              <Txt variant="caption" style={{ color: theme.color.electron }}>━ electrons f(E) with E_Fn</Txt>
              {'   '}
              <Txt variant="caption" style={{ color: theme.color.hole }}>━ holes 1 − f(E) with E_Fp</Txt>
              {'   '}╌ equilibrium f(E) with E_F. Vertical lines: Ev and Ec. Electrons are read at and above Ec, holes at and below Ev: there the tails set n and p.
            </Txt>
          </>
        )}
      </QueryState>
    </Card>
  );

  const ni = (
    <Card title="Intrinsic carrier density" testID="ni-card">
      <QueryState query={material}>{(m) => <MaterialFigures m={m} />}</QueryState>
    </Card>
  );

  if (wide) {
    return (
      <View style={{ gap: 16 }}>
        <Columns wide>
          <View style={{ flex: 1, gap: 16 }}>
            {controls}
            {splitting}
            {ni}
          </View>
          <View style={{ flex: 1.25, gap: 16 }}>
            {band}
            {occupation}
          </View>
        </Columns>
      </View>
    );
  }
  return (
    <View style={{ gap: 16 }}>
      {controls}
      {splitting}
      {band}
      {occupation}
      {ni}
    </View>
  );
}

function Splitting({ d }: { d: BandDiagramJson }) {
  const fd = d.fermiDirac;
  const b = d.boltzmann;
  return (
    <View style={{ gap: 10 }}>
      <View style={styles.figures}>
        <Figure label="E_Fn − E_Fp, Fermi–Dirac" value={eV(fd.splitting_eV)} note={`implied Voc ${fd.impliedVoc_V.toFixed(4)} V`} testID="splitting-fd" />
        <Figure label="E_Fn − E_Fp, Boltzmann" value={eV(b.splitting_eV)} note={`implied Voc ${b.impliedVoc_V.toFixed(4)} V`} testID="splitting-boltzmann" />
        <Figure label="Boltzmann − Fermi–Dirac" value={mV(d.difference.impliedVoc_V)} warn={d.degenerate} testID="splitting-difference" />
      </View>
      <View style={styles.figures}>
        <Figure label="Electrons n (cm⁻³)" value={sig(fd.n_cm3, 3)} note={`dark n0 ${cm3(fd.n0_cm3)}`} />
        <Figure label="Holes p (cm⁻³)" value={sig(fd.p_cm3, 3)} note={`dark p0 ${cm3(fd.p0_cm3)}`} />
        <Figure label="E_F from Ei" value={eV(fd.ef_eV, 3)} note={`Boltzmann ${eV(b.ef_eV, 3)}`} />
      </View>
      {d.degenerate ? (
        <Txt variant="body" style={{ color: theme.color.danger }} testID="degenerate">
          Degenerate: a Fermi level lies within 2·kT of a band edge, where the Boltzmann approximation is off by more than 4 %. Read the Fermi–Dirac figures.
        </Txt>
      ) : (
        <Txt variant="caption">Non-degenerate: both statistics agree; the splitting is the most voltage this material can deliver at this injection (per junction, one cell).</Txt>
      )}
    </View>
  );
}

function MaterialFigures({ m }: { m: MaterialJson }) {
  const offRef = m.reference.modelAtReference_cm3 / m.reference.ni_cm3 - 1;
  return (
    <View style={{ gap: 10 }}>
      <View style={styles.figures}>
        <Figure label={`n_i at ${m.tempK.toFixed(1)} K (cm⁻³)`} value={sig(m.ni_cm3, 3)} testID="ni-value" />
        <Figure
          label={`Reference n_i at ${m.reference.tempK} K (cm⁻³)`}
          value={sig(m.reference.ni_cm3, 3)}
          note={`${m.reference.source}; this model: ${sig(m.reference.modelAtReference_cm3, 3)} (${offRef >= 0 ? '+' : ''}${(100 * offRef).toFixed(1)} %)`}
          testID="ni-reference"
        />
        <Figure label="Band gap Eg" value={eV(m.eg_ev)} />
        <Figure label="Nc · Nv (cm⁻³)" value={`${sig(m.nc_cm3, 3)} · ${sig(m.nv_cm3, 3)}`} />
      </View>
      <PhysicsNiChart series={m.series} current={{ tempK: m.tempK, ni_cm3: m.ni_cm3 }} reference={m.reference} testID="ni-chart" />
      <Txt variant="caption">
        ━ n_i model ({m.material.sources.intrinsicDensity}) ● this temperature ◆ {m.reference.source}. Eg: {m.material.sources.bandgap}. Nc, Nv: {m.material.sources.densityOfStates}.
      </Txt>
    </View>
  );
}

// ---- one curve's physics ------------------------------------------------------------------

function CurveSection({ id, wide }: { id: string; wide: boolean }) {
  const physics = useCurvePhysics(id);
  return (
    <QueryState query={physics}>
      {(p) => <CurveBody p={p} wide={wide} />}
    </QueryState>
  );
}

function CurveBody({ p, wide }: { p: CurvePhysicsJson; wide: boolean }) {
  const router = useRouter();
  const s = p.single;
  const c = p.conditions;
  const module = c.cells > 1 || isAboveElv(p.curve.metrics.voc_v);
  const coef = s?.coefficient;
  const lawName = (law: string) => (law === 'desoto' ? 'I0 ∝ T³·exp(−Eg/kT) (De Soto et al. 2006)' : 'I0 ∝ n_i(T)^(2/n)');
  const conditions = [`${c.tempC} °C`, c.irradiance_Wm2 != null ? `${c.irradiance_Wm2} W/m²` : 'irradiance not given', `${c.cells} cell${c.cells === 1 ? '' : 's'} in series`, c.area_cm2 != null ? `${c.area_cm2} cm²` : 'no area'].join(' · ');
  const measured = useMemo(() => ({ tempC: c.tempC, voc_V: p.curve.metrics.voc_v }), [c.tempC, p.curve.metrics.voc_v]);

  const head = (
    <Card testID="physics-curve">
      <View style={styles.curveHead}>
        <View style={{ flex: 1, minWidth: 200, gap: 2 }}>
          <Txt variant="heading">Curve {p.curve.device_id}</Txt>
          <Txt variant="caption">{[p.curve.batch?.name, conditions].filter(Boolean).join(' · ')}</Txt>
        </View>
        <View style={{ flexDirection: 'row', gap: 8, flexWrap: 'wrap' }}>
          <Button label="Open the curve" kind="secondary" onPress={() => router.push(`/curves/${p.curve.id}`)} />
          <Button label="Without the curve" kind="quiet" onPress={() => router.replace('/physics')} testID="physics-clear-curve" />
        </View>
      </View>
    </Card>
  );

  if (!s) {
    return (
      <View style={{ gap: 16 }}>
        {head}
        <View style={styles.empty} testID="physics-curve-empty">
          <Txt variant="body">This curve has no converged single-diode fit, so J0 and its temperature behaviour cannot be derived. Fit it again from the curve page.</Txt>
          {p.notes.map((n) => (
            <Txt key={n} variant="caption">{n}</Txt>
          ))}
        </View>
      </View>
    );
  }

  const figures = (
    <Card title="Saturation current and temperature" testID="curve-physics-figures">
      <View style={styles.figures}>
        <Figure
          label="J0 per cell area (A/cm²)"
          value={s.j0_A_per_cm2 != null ? sig(s.j0_A_per_cm2, 3) : 'no area'}
          note={s.j0_A_per_cm2 != null ? `I0 ${fmtParam('i0_a', s.params.i0_a, 3)} over ${sig(c.cellArea_cm2, 4)} cm² per cell, n = ${s.params.n.toFixed(3)}` : 'J0 needs the device area: refit the curve with it.'}
          testID="j0-figure"
        />
        <Figure
          label="Implied Voc from Jsc and J0"
          value={s.impliedVoc ? fmtParam('voc_v', s.impliedVoc.voc_V) : '—'}
          note={s.impliedVoc ? `measured Voc ${fmtParam('voc_v', s.impliedVoc.measuredVoc_V)}; n·Ns·kT/q·ln(Jsc/J0 + 1)` : undefined}
          warn={!!s.impliedVoc && isAboveElv(s.impliedVoc.voc_V)}
          testID="implied-voc"
        />
        {coef ? (
          <Figure
            label="Voc temperature coefficient β"
            value={`${(coef.beta_V_per_K * 1000).toFixed(1)} mV/K`}
            note={`${coef.beta_pct_per_K.toFixed(3)} %/K · ${(coef.betaPerCell_V_per_K * 1000).toFixed(2)} mV/K per cell · ${lawName(coef.law)}, Isc +${(coef.alphaIsc_rel_per_K * 100).toFixed(2)} %/K`}
            testID="voc-coefficient"
          />
        ) : null}
        {s.coefficientDeSoto ? (
          <Figure label="β with the De Soto law" value={`${s.coefficientDeSoto.beta_pct_per_K.toFixed(3)} %/K`} note={`${(s.coefficientDeSoto.beta_V_per_K * 1000).toFixed(1)} mV/K; no 1/n in its exponent, so steeper for n > 1`} />
        ) : null}
      </View>
      {p.double ? (
        <View style={{ gap: 6 }} testID="recombination-shares">
          <Txt variant="label">Double-diode fit: where the diode current goes at the maximum power point</Txt>
          {p.double.shares ? (
            <View style={styles.figures}>
              <Figure label={`Diffusion (n1 = ${p.double.params.n1.toFixed(2)})`} value={`${(100 * p.double.shares.diffusionShare).toFixed(1)} %`} note={`${fmtParam('i0_a', p.double.shares.diode1_a, 3)}${p.double.j01_A_per_cm2 != null ? ` · J01 ${fmtParam('j0_a_cm2', p.double.j01_A_per_cm2, 3)}` : ''}`} />
              <Figure label={`Depletion region (n2 = ${p.double.params.n2.toFixed(2)})`} value={`${(100 * p.double.shares.depletionShare).toFixed(1)} %`} note={`${fmtParam('i0_a', p.double.shares.diode2_a, 3)}${p.double.j02_A_per_cm2 != null ? ` · J02 ${fmtParam('j0_a_cm2', p.double.j02_A_per_cm2, 3)}` : ''}`} />
            </View>
          ) : (
            <Txt variant="caption">The shares could not be computed (see the notes below).</Txt>
          )}
        </View>
      ) : null}
    </Card>
  );

  const chart = (
    <Card title="Voc across cell temperature">
      {s.vocVsTemperature ? (
        <>
          <PhysicsVocChart points={s.vocVsTemperature.points} measured={measured} testID="voc-temperature-chart" />
          <Txt variant="caption">
            ━ predicted from the single-diode fit ({lawName(s.vocVsTemperature.law)}, n, Rs, Rsh held) ◆ measured {fmtParam('voc_v', measured.voc_V)} at {measured.tempC} °C. −40 to +85 °C. The coldest morning gives the highest voltage.
          </Txt>
        </>
      ) : (
        <Txt variant="body">The prediction could not be computed (see the notes below).</Txt>
      )}
    </Card>
  );

  const stc = (
    <Card title="At standard test conditions" testID="physics-stc">
      {p.stc ? (
        <>
          <View style={styles.figures}>
            <Figure label="Isc" value={fmtParam('isc_a', p.stc.isc_a)} />
            <Figure label="Voc" value={fmtParam('voc_v', p.stc.voc_v)} warn={isAboveElv(p.stc.voc_v)} />
            <Figure label="Pmax" value={fmtParam('pmp_w', p.stc.pmp_w)} note={`at ${fmtParam('vmp_v', p.stc.vmp_v)}, ${fmtParam('imp_a', p.stc.imp_a)}`} />
            <Figure label="Fill factor" value={fmtParam('ff', p.stc.ff)} />
            {p.stc.efficiency != null ? <Figure label="Efficiency" value={fmtParam('efficiency', p.stc.efficiency)} /> : null}
          </View>
          <Txt variant="caption">Stored with the curve: the fit at {p.stc.from.tempC} °C and {p.stc.from.irradiance_Wm2} W/m² moved to 1000 W/m², 25 °C (De Soto et al. 2006). {p.stc.notes.join(' ')}</Txt>
        </>
      ) : (
        <Txt variant="body">No STC figures are stored for this curve.</Txt>
      )}
    </Card>
  );

  const translate = (
    <Card title="Translate to other conditions">
      <PhysicsTranslateForm physics={p} />
    </Card>
  );

  return (
    <View style={{ gap: 16 }}>
      {head}
      {module ? <CautionBlock /> : null}
      {wide ? (
        <Columns wide>
          <View style={{ flex: 1, gap: 16 }}>
            {figures}
            {stc}
          </View>
          <View style={{ flex: 1, gap: 16 }}>
            {chart}
            {translate}
          </View>
        </Columns>
      ) : (
        <>
          {figures}
          {chart}
          {stc}
          {translate}
        </>
      )}
      {p.notes.length ? (
        <Txt variant="caption" testID="physics-notes">
          {p.notes.join(' ')}
        </Txt>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  controls: { flexDirection: 'row', flexWrap: 'wrap', gap: 16 },
  controlCell: { flexGrow: 1, flexBasis: 260, minWidth: 0, gap: 10 },
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: 14 },
  curveHead: { flexDirection: 'row', flexWrap: 'wrap', gap: 12, alignItems: 'flex-end', justifyContent: 'space-between' },
  empty: { padding: 16, borderRadius: theme.radius.m, gap: 8, borderWidth: 1, backgroundColor: theme.color.sunken, borderColor: theme.color.line },
});
