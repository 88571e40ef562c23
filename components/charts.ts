/**
 * Every chart of the product in one module, which the screens load on first use through
 * components/lazy-charts.tsx: the charting library (victory-native with its d3 and lodash parts,
 * ~440 kB of script) then travels in a bundle of its own instead of the one every screen loads
 * first, the sign-in page included. Import the charts from lazy-charts, not from here; the chart
 * files stay importable directly for their component tests.
 */
export { CoefficientChart, EfficiencyChart } from '@/components/characterisation-charts';
export { DistributionChart } from '@/components/distribution-chart';
export { IvChart } from '@/components/iv-chart';
export { OverlayChart } from '@/components/overlay-chart';
export { PhysicsNiChart } from '@/components/physics-ni-chart';
export { PhysicsOccupationChart } from '@/components/physics-occupation-chart';
export { PhysicsVocChart } from '@/components/physics-voc-chart';
export { ResidualChart } from '@/components/residual-chart';
export { StringVocChart } from '@/components/string-voc-chart';
