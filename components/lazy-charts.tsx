import { lazy, Suspense } from 'react';
import type { ComponentType } from 'react';
import { View } from 'react-native';
import { Txt } from '@/components/txt';

type Charts = typeof import('@/components/charts');

/** One import of the charts module for all charts: the first chart on a screen loads it, the rest find it loaded. */
let loading: Promise<Charts> | null = null;
const loadCharts = () => (loading ??= import('@/components/charts'));

/**
 * A chart of components/charts.ts that loads with its module on first use (see there why),
 * showing a line of text in its place meanwhile. Same name and props as the chart itself.
 */
function lazyChart<P extends object>(name: string, pick: (charts: Charts) => ComponentType<P>) {
  const Loaded = lazy(async () => ({ default: pick(await loadCharts()) }));
  function Chart(props: P) {
    return (
      <Suspense
        fallback={
          <View style={{ minHeight: 120, justifyContent: 'center' }}>
            <Txt variant="caption">Loading the chart…</Txt>
          </View>
        }
      >
        <Loaded {...props} />
      </Suspense>
    );
  }
  Chart.displayName = `Lazy${name}`;
  return Chart;
}

export const CoefficientChart = lazyChart('CoefficientChart', (c) => c.CoefficientChart);
export const EfficiencyChart = lazyChart('EfficiencyChart', (c) => c.EfficiencyChart);
export const DistributionChart = lazyChart('DistributionChart', (c) => c.DistributionChart);
export const IvChart = lazyChart('IvChart', (c) => c.IvChart);
export const OverlayChart = lazyChart('OverlayChart', (c) => c.OverlayChart);
export const PhysicsNiChart = lazyChart('PhysicsNiChart', (c) => c.PhysicsNiChart);
export const PhysicsOccupationChart = lazyChart('PhysicsOccupationChart', (c) => c.PhysicsOccupationChart);
export const PhysicsVocChart = lazyChart('PhysicsVocChart', (c) => c.PhysicsVocChart);
export const ResidualChart = lazyChart('ResidualChart', (c) => c.ResidualChart);
export const StringVocChart = lazyChart('StringVocChart', (c) => c.StringVocChart);
