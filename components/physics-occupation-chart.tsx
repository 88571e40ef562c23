import { VictoryAxis, VictoryChart, VictoryLine, VictoryScatter } from 'victory-native';
import { ChartFrame } from '@/components/chart-frame';
import { chartStyle, tick } from '@/components/chart-style';
import { LOG_CHART, powerOfTenTick } from '@/components/physics-ticks';
import { theme } from '@/components/theme';
import type { OccupationCurve } from '@/lib/physics';
import { sig4 } from '@/lib/charts/readout';

/** Occupations below this are drawn on the floor of the log chart. */
const FLOOR = 1e-22;
const LOG_TICKS = [1e-20, 1e-15, 1e-10, 1e-5, 1];

/**
 * The Fermi–Dirac occupation f(E) across the gap: equilibrium (with E_F), electrons (with E_Fn)
 * and holes, 1 − f(E) (with E_Fp); the band edges as vertical lines. On the log scale the tails
 * at the band edges, which set the carrier densities, can be read.
 */
export function PhysicsOccupationChart({ occupation, scale, height = 240, testID }: { occupation: OccupationCurve; scale: 'log' | 'linear'; height?: number; testID?: string }) {
  const log = scale === 'log';
  const lo = log ? FLOOR : 0;
  const pts = (f: number[]) => occupation.energy_ev.map((e, k) => ({ x: e, y: log ? Math.max(FLOOR, f[k]) : f[k] }));
  const edge = (x: number) => [{ x, y: lo }, { x, y: 1 }];
  return (
    <ChartFrame height={height} testID={testID} download={{ name: 'occupation', kind: scale, title: 'Occupation across the gap' }}
      table={{
        columns: ['Energy from Ei (eV)', 'f(E) equilibrium', 'f(E) electrons', '1 − f(E) holes'],
        rows: occupation.energy_ev.map((e, k) => [sig4(e), sig4(occupation.occupation_equilibrium[k]), sig4(occupation.occupation_electrons[k]), sig4(occupation.occupation_holes[k])]),
      }}
    >
      {(width) => (
        <VictoryChart width={width} height={height} padding={LOG_CHART.padding} scale={{ y: log ? 'log' : 'linear' }} domain={{ y: [lo, 1] }}>
          <VictoryAxis crossAxis={false} offsetY={LOG_CHART.padding.bottom} label="Energy from Ei (eV)" style={chartStyle.axis} tickFormat={tick} tickCount={6} />
          <VictoryAxis
            dependentAxis
            crossAxis={false}
            offsetX={LOG_CHART.padding.left}
            label={log ? 'Occupation (log)' : 'Occupation'}
            style={log ? LOG_CHART.yAxis : chartStyle.axis}
            tickValues={log ? LOG_TICKS : [0, 0.25, 0.5, 0.75, 1]}
            tickFormat={log ? powerOfTenTick : tick}
          />
          <VictoryLine data={edge(occupation.ev_ev)} style={{ data: { stroke: theme.color.ink, strokeWidth: 1 } }} />
          <VictoryLine data={edge(occupation.ec_ev)} style={{ data: { stroke: theme.color.ink, strokeWidth: 1 } }} />
          <VictoryLine data={pts(occupation.occupation_equilibrium)} style={{ data: { stroke: theme.color.muted, strokeWidth: 1.5, strokeDasharray: '6,4' } }} />
          <VictoryLine data={pts(occupation.occupation_electrons)} style={{ data: { stroke: theme.color.electron, strokeWidth: 2 } }} />
          <VictoryLine data={pts(occupation.occupation_holes)} style={{ data: { stroke: theme.color.hole, strokeWidth: 2 } }} />
          <VictoryScatter
            data={[{ x: occupation.ev_ev, y: 1 }, { x: occupation.ec_ev, y: 1 }]}
            size={0}
            labels={['Ev', 'Ec']}
            style={{ labels: { fontFamily: theme.font.mono, fontSize: 10, fill: theme.color.ink } }}
          />
        </VictoryChart>
      )}
    </ChartFrame>
  );
}
