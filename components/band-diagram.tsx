import Svg, { G, Line, Path, Rect, Text as SvgText, TSpan } from 'react-native-svg';
import { ChartFrame } from '@/components/chart-frame';
import { theme } from '@/components/theme';
import type { BandLevel } from '@/lib/physics';

type Key = BandLevel['key'];

const LOOK: Record<Key, { sub: string; color: string; width: number; dash?: string; name: string }> = {
  Ec: { sub: 'c', color: theme.color.ink, width: 2.5, name: 'conduction band edge' },
  EFn: { sub: 'Fn', color: theme.color.electron, width: 2, name: 'electron quasi-Fermi level' },
  EF: { sub: 'F', color: theme.color.inkSoft, width: 1.5, dash: '7,4', name: 'equilibrium Fermi level' },
  Ei: { sub: 'i', color: theme.color.muted, width: 1, dash: '2,4', name: 'intrinsic level' },
  EFp: { sub: 'Fp', color: theme.color.hole, width: 2, name: 'hole quasi-Fermi level' },
  Ev: { sub: 'v', color: theme.color.ink, width: 2.5, name: 'valence band edge' },
};

/** Labels no closer than this, px; pushed apart and tied to their line by a leader. */
const LABEL_GAP = 16;
const LABEL_COLUMN = 118;

function signed(e: number): string {
  const s = e.toFixed(3);
  return e > 0 ? `+${s}` : s === '-0.000' ? '0.000' : s;
}

/** Spreads label positions (sorted top to bottom) at least `gap` apart inside [lo, hi]. */
function spread(ys: number[], gap: number, lo: number, hi: number): number[] {
  const out = ys.map((y) => Math.min(hi, Math.max(lo, y)));
  for (let k = 1; k < out.length; k++) out[k] = Math.max(out[k], out[k - 1] + gap);
  if (out[out.length - 1] > hi) {
    out[out.length - 1] = hi;
    for (let k = out.length - 2; k >= 0; k--) out[k] = Math.min(out[k], out[k + 1] - gap);
  }
  return out;
}

/**
 * A flat-band diagram of a piece of semiconductor: the band edges Ec and Ev, the intrinsic level
 * Ei, the equilibrium Fermi level E_F and, under injection, the quasi-Fermi levels E_Fn and E_Fp
 * with their splitting. Energies in eV measured from Ei; labels carry the values.
 */
export function BandDiagram({ levels, splitting_ev, height = 300, testID }: { levels: BandLevel[]; splitting_ev: number; height?: number; testID?: string }) {
  const at = Object.fromEntries(levels.map((l) => [l.key, l.energy_ev])) as Record<Key, number>;
  const gap = at.Ec - at.Ev;
  const eTop = at.Ec + 0.16 * gap;
  const eBottom = at.Ev - 0.16 * gap;
  const summary = levels.map((l) => `${LOOK[l.key].name} ${signed(l.energy_ev)} eV`).join(', ');
  return (
    <ChartFrame height={height} testID={testID} name="Band diagram: band edges and the quasi-Fermi levels of electrons and holes">
      {(width) => {
        const top = 6;
        const bottom = height - 6;
        const y = (e: number) => top + ((eTop - e) / (eTop - eBottom)) * (bottom - top);
        const x0 = 8;
        const x1 = Math.max(x0 + 80, width - LABEL_COLUMN);
        const order = [...levels].sort((a, b) => b.energy_ev - a.energy_ev);
        const labelY = spread(order.map((l) => y(l.energy_ev)), LABEL_GAP, top + 10, bottom - 4);
        const yn = y(at.EFn);
        const yp = y(at.EFp);
        const ax = x0 + (x1 - x0) * 0.62;
        const showArrow = yp - yn > 14;
        return (
          <Svg width={width} height={height} accessibilityLabel={`Band diagram: ${summary}`}>
            <Rect x={x0} y={top} width={x1 - x0} height={y(at.Ec) - top} fill={theme.color.electronSoft} />
            <Rect x={x0} y={y(at.Ev)} width={x1 - x0} height={bottom - y(at.Ev)} fill={theme.color.holeSoft} />
            <SvgText x={x0 + 6} y={top + 14} fontSize={11} fill={theme.color.electron} fontFamily={theme.font.regular}>
              conduction band
            </SvgText>
            <SvgText x={x0 + 6} y={bottom - 6} fontSize={11} fill={theme.color.hole} fontFamily={theme.font.regular}>
              valence band
            </SvgText>
            {order.map((l, k) => {
              const look = LOOK[l.key];
              const yl = y(l.energy_ev);
              const ylab = labelY[k];
              return (
                <G key={l.key}>
                  <Line x1={x0} x2={x1} y1={yl} y2={yl} stroke={look.color} strokeWidth={look.width} strokeDasharray={look.dash} />
                  <Line x1={x1} x2={x1 + 10} y1={yl} y2={ylab} stroke={look.color} strokeWidth={1} />
                  <SvgText x={x1 + 14} y={ylab + 4} fontSize={12} fill={look.color} fontFamily={theme.font.mono}>
                    <TSpan>E</TSpan>
                    <TSpan fontSize={9} dy={3}>
                      {look.sub}
                    </TSpan>
                    <TSpan dy={-3}>{` ${signed(l.energy_ev)} eV`}</TSpan>
                  </SvgText>
                </G>
              );
            })}
            {showArrow ? (
              <G>
                <Line x1={ax} x2={ax} y1={yn + 5} y2={yp - 5} stroke={theme.color.ink} strokeWidth={1.2} />
                <Path d={`M ${ax - 4} ${yn + 7} L ${ax} ${yn + 1} L ${ax + 4} ${yn + 7} Z`} fill={theme.color.ink} />
                <Path d={`M ${ax - 4} ${yp - 7} L ${ax} ${yp - 1} L ${ax + 4} ${yp - 7} Z`} fill={theme.color.ink} />
                <Rect x={ax - 8 - 7.3 * 15} y={(yn + yp) / 2 - 9} width={7.3 * 15 + 2} height={18} rx={3} fill={theme.color.surface} opacity={0.9} />
                <SvgText x={ax - 6} y={(yn + yp) / 2 + 4} fontSize={12} fill={theme.color.ink} fontFamily={theme.font.mono} textAnchor="end">
                  {`ΔE = ${splitting_ev.toFixed(3)} eV`}
                </SvgText>
              </G>
            ) : null}
          </Svg>
        );
      }}
    </ChartFrame>
  );
}
