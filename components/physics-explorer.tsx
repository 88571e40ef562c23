import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { BandDiagram } from '@/components/band-diagram';
import { Card } from '@/components/card';
import { PhysicsChoice } from '@/components/physics-choice';
import { PhysicsColumns } from '@/components/physics-columns';
import { PhysicsMaterialFigures } from '@/components/physics-material-figures';
import { PhysicsOccupationChart } from '@/components/lazy-charts';
import { PhysicsRange } from '@/components/physics-range';
import { PhysicsSplitting } from '@/components/physics-splitting';
import { PhysicsStepper } from '@/components/physics-stepper';
import { eV } from '@/components/physics-units';
import { QueryState } from '@/components/query-state';
import { theme } from '@/components/theme';
import { useSettled } from '@/components/use-settled';
import { Txt } from '@/components/txt';
import { ApiError, toUserMessage } from '@/lib/api/client';
import { useBandDiagram, useMaterial } from '@/lib/api/physics';
import { sig } from '@/lib/format';
import { ZERO_C_IN_K } from '@/lib/physics/constants';
import { NI_RANGE_K } from '@/lib/schemas/physics';
import type { BandDiagramRequest } from '@/lib/schemas/physics';
import { checkExplorer, checkRange } from '@/lib/schemas/physics-form';
import type { ExplorerField } from '@/lib/schemas/physics-form';
import { labelOf } from '@/lib/vocabulary';

/** Temperatures the steppers stay within, K (the silicon model's range; the server checks too). */
const TEMP_LIMITS_K = { min: 150, max: 500 };
const TEMP_STEP = 5;
/** Density steppers run through 1-2-5 values between these, cm⁻³; below the lowest comes 0. */
const DENSITY_LIMITS = { min: 1e8, max: 1e21 };

function readNumber(text: string): number {
  const t = text.trim().replace(/\s+/g, '').replace(',', '.');
  return t === '' ? Number.NaN : Number(t);
}

/** The explorer field an API error names (its `details.input`), if any. */
const FIELD_OF_INPUT: Record<string, ExplorerField> = { temp_k: 'temp', doping_cm3: 'doping', excess_cm3: 'excess' };
function fieldOfError(error: unknown): ExplorerField | null {
  if (!(error instanceof ApiError)) return null;
  const input = (error.details as { input?: string } | undefined)?.input;
  return input ? (FIELD_OF_INPUT[input] ?? null) : null;
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
  const [niFrom, setNiFrom] = useState('');
  const [niTo, setNiTo] = useState('');

  // Every field checked before anything is sent; an invalid one shows its error at the field and
  // no result is shown for it (never the answer to an earlier input).
  const checked = checkExplorer({ tempText, unit, type, dopingText, excessText });
  const temp_k = checked.temp_k;
  const niRange = checkRange(niFrom, niTo, 'K', NI_RANGE_K);
  const settledRequest = useSettled<BandDiagramRequest | null>(checked.request);
  const settledTempK = useSettled(temp_k);
  const settledNiRange = useSettled(niRange.range ? { from_k: niRange.range.from, to_k: niRange.range.to } : null);
  const material = useMaterial(settledTempK, settledNiRange);
  const diagram = useBandDiagram(settledRequest);

  // A refusal by the server goes to the field it names, once; the result cards then show nothing.
  const diagramField = diagram.isError && !diagram.isFetching ? fieldOfError(diagram.error) : null;
  const materialField = material.isError && !material.isFetching ? fieldOfError(material.error) : null;
  const errorAt = (f: ExplorerField) =>
    checked.errors[f] ?? (diagramField === f ? toUserMessage(diagram.error) : materialField === f ? toUserMessage(material.error) : null);
  const inputInvalid = Object.keys(checked.errors).length > 0 || diagramField !== null;
  const tempInvalid = !!checked.errors.temp || materialField === 'temp';

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
            error={errorAt('temp')}
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
          <PhysicsStepper label={labelOf('doping_cm3')} unit="cm⁻³" value={dopingText} onChangeText={setDopingText} onStep={(d) => stepDensity(dopingText, setDopingText, d)} error={errorAt('doping')} note={dopingNote} testID="doping" />
        </View>
        <View style={styles.controlCell}>
          <PhysicsStepper label={labelOf('excess_cm3')} unit="cm⁻³" value={excessText} onChangeText={setExcessText} onStep={(d) => stepDensity(excessText, setExcessText, d)} error={errorAt('excess')} note={excessNote} testID="excess" />
        </View>
      </View>
      <Txt variant="caption">Steps: 5 K; densities through 1, 2, 5 × 10ⁿ. Type values such as 3.3e15. The excess carrier density is the injection (Δn = Δp). Dopants fully ionised, no band-gap narrowing.</Txt>
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

  const ni = tempInvalid ? null : (
    <Card title="Intrinsic carrier density" testID="ni-card">
      <PhysicsRange unit="K" from={niFrom} to={niTo} onFrom={setNiFrom} onTo={setNiTo} errors={niRange.errors} defaults={NI_RANGE_K} testID="ni-range" />
      <QueryState query={material}>{(m) => <PhysicsMaterialFigures m={m} showChart={niRange.range !== null} />}</QueryState>
    </Card>
  );

  // One card instead of three while the input is not valid or the server could not answer it:
  // the field says what is wrong (or this card, once, when no field is to blame).
  const blocked = inputInvalid || (diagram.isError && !diagram.isFetching);
  const noResult = (
    <Card title="Results" testID="physics-no-result">
      {inputInvalid ? (
        <Txt variant="body">No results while an input is not valid; the message at it says what to change.</Txt>
      ) : (
        <QueryState query={diagram}>{() => null}</QueryState>
      )}
    </Card>
  );

  if (wide) {
    return (
      <View style={{ gap: 16 }}>
        <PhysicsColumns wide>
          <View style={{ flex: 1, gap: 16 }}>
            {controls}
            {blocked ? null : splitting}
            {ni}
          </View>
          <View style={{ flex: 1.25, gap: 16 }}>
            {blocked ? noResult : band}
            {blocked ? null : occupation}
          </View>
        </PhysicsColumns>
      </View>
    );
  }
  return (
    <View style={{ gap: 16 }}>
      {controls}
      {blocked ? noResult : splitting}
      {blocked ? null : band}
      {blocked ? null : occupation}
      {ni}
    </View>
  );
}

const styles = StyleSheet.create({
  controls: { flexDirection: 'row', flexWrap: 'wrap', gap: 16 },
  controlCell: { flexGrow: 1, flexBasis: 260, minWidth: 0, gap: 10 },
});
