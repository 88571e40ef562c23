import { useEffect, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { BandDiagram } from '@/components/band-diagram';
import { Card } from '@/components/card';
import { PhysicsChoice } from '@/components/physics-choice';
import { PhysicsColumns } from '@/components/physics-columns';
import { PhysicsMaterialFigures } from '@/components/physics-material-figures';
import { PhysicsOccupationChart } from '@/components/physics-occupation-chart';
import { PhysicsSplitting } from '@/components/physics-splitting';
import { PhysicsStepper } from '@/components/physics-stepper';
import { eV } from '@/components/physics-units';
import { QueryState } from '@/components/query-state';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { useBandDiagram, useMaterial } from '@/lib/api/physics';
import { sig } from '@/lib/format';
import { ZERO_C_IN_K } from '@/lib/physics/constants';
import { bandDiagramSchema } from '@/lib/schemas/physics';
import type { BandDiagramRequest } from '@/lib/schemas/physics';

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

/**
 * The explorer: temperature, doping and injection in, the splitting, the band diagram, the
 * occupation around the band edges and n_i out (answers from the API as the inputs settle).
 */
export function PhysicsExplorer({ wide }: { wide: boolean }) {
  const [unit, setUnit] = useState<'K' | 'C'>('K');
  const [tempText, setTempText] = useState('300');
  const [type, setType] = useState<'p' | 'n'>('p');
  const [dopingText, setDopingText] = useState('1e16');
  const [excessText, setExcessText] = useState('1e15');
  const [scale, setScale] = useState<'log' | 'linear'>('log');

  const tempValue = readNumber(tempText);
  const temp_k = Number.isFinite(tempValue) ? (unit === 'K' ? tempValue : tempValue + ZERO_C_IN_K) : null;
  const tempError = temp_k == null ? `Write the temperature as a number in ${unit === 'K' ? 'kelvin' : '°C'}.` : null;

  const parsed = bandDiagramSchema.safeParse({ type, doping_cm3: dopingText, excess_cm3: excessText, temp_k: temp_k ?? Number.NaN });
  const fieldError = (name: string) => (parsed.success ? null : (parsed.error.issues.find((i) => i.path[0] === name)?.message ?? null));
  const settledRequest = useSettled<BandDiagramRequest | null>(parsed.success && temp_k != null ? parsed.data : null);
  const settledTempK = useSettled(temp_k);
  const material = useMaterial(settledTempK);
  const diagram = useBandDiagram(settledRequest);

  const setUnitKeepingValue = (u: 'K' | 'C') => {
    if (u === unit) return;
    if (temp_k != null) setTempText(String(Number((u === 'K' ? temp_k : temp_k - ZERO_C_IN_K).toFixed(2))));
    setUnit(u);
  };
  const stepTemp = (dir: -1 | 1) => {
    const k = Math.min(TEMP_LIMITS_K.max, Math.max(TEMP_LIMITS_K.min, (temp_k ?? 300) + dir * TEMP_STEP));
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
            note={temp_k != null ? (unit === 'K' ? `= ${(temp_k - ZERO_C_IN_K).toFixed(2)} °C` : `= ${temp_k.toFixed(2)} K`) : undefined}
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
      <QueryState query={diagram}>{(d) => <PhysicsSplitting d={d} />}</QueryState>
    </Card>
  );

  const band = (
    <Card title="Band diagram" testID="band-card">
      <QueryState query={diagram}>
        {(d) => (
          <>
            <BandDiagram levels={d.diagram.levels} splitting_ev={d.diagram.splitting_ev} testID="band-diagram" />
            <Txt variant="caption">
              Energies in eV from the intrinsic level Ei; Ec − Ev = {eV(d.material.eg_dos_ev, 3)} (the gap implied by n_i). {d.input.type}-type {sig(d.input.doping_cm3, 3)} cm⁻³ at {d.input.temp_k.toFixed(1)} K.
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
      <QueryState query={material}>{(m) => <PhysicsMaterialFigures m={m} />}</QueryState>
    </Card>
  );

  if (wide) {
    return (
      <View style={{ gap: 16 }}>
        <PhysicsColumns wide>
          <View style={{ flex: 1, gap: 16 }}>
            {controls}
            {splitting}
            {ni}
          </View>
          <View style={{ flex: 1.25, gap: 16 }}>
            {band}
            {occupation}
          </View>
        </PhysicsColumns>
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

const styles = StyleSheet.create({
  controls: { flexDirection: 'row', flexWrap: 'wrap', gap: 16 },
  controlCell: { flexGrow: 1, flexBasis: 260, minWidth: 0, gap: 10 },
});
