import { StyleSheet, View } from 'react-native';
import { Figure } from '@/components/figure';
import { cm3, eV, mV } from '@/components/physics-units';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import type { BandDiagramJson } from '@/lib/api/physics';
import { sig } from '@/lib/format';

/** The quasi-Fermi-level splitting by both statistics, the carrier densities and a word on degeneracy. */
export function PhysicsSplitting({ d }: { d: BandDiagramJson }) {
  const fd = d.fermi_dirac;
  const b = d.boltzmann;
  return (
    <View style={{ gap: 10 }}>
      <View style={styles.figures}>
        <Figure label="E_Fn − E_Fp, Fermi–Dirac" value={eV(fd.splitting_ev)} note={`implied Voc ${fd.implied_voc_v.toFixed(4)} V`} testID="splitting-fd" />
        <Figure label="E_Fn − E_Fp, Boltzmann" value={eV(b.splitting_ev)} note={`implied Voc ${b.implied_voc_v.toFixed(4)} V`} testID="splitting-boltzmann" />
        <Figure label="Boltzmann − Fermi–Dirac" value={mV(d.difference.implied_voc_v)} warn={d.degenerate} testID="splitting-difference" />
      </View>
      <View style={styles.figures}>
        <Figure label="Electrons n (cm⁻³)" value={sig(fd.n_cm3, 3)} note={`dark n0 ${cm3(fd.n0_cm3)}`} />
        <Figure label="Holes p (cm⁻³)" value={sig(fd.p_cm3, 3)} note={`dark p0 ${cm3(fd.p0_cm3)}`} />
        <Figure label="E_F from Ei" value={eV(fd.ef_ev, 3)} note={`Boltzmann ${eV(b.ef_ev, 3)}`} />
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

const styles = StyleSheet.create({
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: 14 },
});
