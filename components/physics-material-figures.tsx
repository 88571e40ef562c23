import { StyleSheet, View } from 'react-native';
import { Figure } from '@/components/figure';
import { PhysicsNiChart } from '@/components/lazy-charts';
import { eV } from '@/components/physics-units';
import { Txt } from '@/components/txt';
import type { MaterialJson } from '@/lib/api/physics';
import { sig } from '@/lib/format';

/** n_i, Eg, Nc·Nv at the chosen temperature, the reference n_i beside the model, and n_i across temperature (unless its range is not valid). */
export function PhysicsMaterialFigures({ m, showChart = true }: { m: MaterialJson; showChart?: boolean }) {
  const offRef = m.reference.model_at_reference_cm3 / m.reference.ni_cm3 - 1;
  return (
    <View style={{ gap: 10 }}>
      <View style={styles.figures}>
        <Figure label={`n_i at ${m.temp_k.toFixed(1)} K (cm⁻³)`} value={sig(m.ni_cm3, 3)} testID="ni-value" />
        <Figure
          label={`Reference n_i at ${m.reference.temp_k} K (cm⁻³)`}
          value={sig(m.reference.ni_cm3, 3)}
          note={`${m.reference.source}; this model: ${sig(m.reference.model_at_reference_cm3, 3)} (${offRef >= 0 ? '+' : ''}${(100 * offRef).toFixed(1)} %)`}
          testID="ni-reference"
        />
        <Figure label="Band gap Eg" value={eV(m.eg_ev)} />
        <Figure label="Nc · Nv (cm⁻³)" value={`${sig(m.nc_cm3, 3)} · ${sig(m.nv_cm3, 3)}`} />
      </View>
      {showChart ? (
        <>
          <PhysicsNiChart series={m.series} current={{ temp_k: m.temp_k, ni_cm3: m.ni_cm3 }} reference={m.reference} testID="ni-chart" />
          <Txt variant="caption">
            ━ n_i model ({m.material.sources.intrinsic_density}) ● this temperature ◆ {m.reference.source}. Eg: {m.material.sources.bandgap}. Nc, Nv: {m.material.sources.density_of_states}.
          </Txt>
        </>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: 14 },
});
