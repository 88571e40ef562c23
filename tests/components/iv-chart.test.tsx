import { act, fireEvent, render, screen, within } from '@testing-library/react-native';
import { Text } from 'react-native';
import type { ReactTestInstance } from 'react-test-renderer';
import { VictoryAxis, VictoryLine, VictoryScatter } from 'victory-native';
import { ChartFrame } from '@/components/chart-frame';
import { chartStyle } from '@/components/chart-style';
import { IvChart } from '@/components/iv-chart';
import { OverlayChart } from '@/components/overlay-chart';
import { theme } from '@/components/theme';
import { domainOf, toPixel } from '@/lib/charts/plot-frame';

/** Fires a layout event of the given width (px) on the chart's measuring view. */
function layOut(testID: string, width: number) {
  fireEvent(screen.getByTestId(`${testID}-frame`), 'layout', { nativeEvent: { layout: { x: 0, y: 0, width, height: 260 } } });
}

/** SVG text is not host Text: read the labels off react-native-svg's TSpan elements. */
const svgLabels = (root: ReactTestInstance) => root.findAll((n) => (n.type as unknown) === 'RNSVGTSpan').map((n) => String(n.props.content));

/** Host views' background colours under a node (the legend's marks). */
const fills = (root: ReactTestInstance) =>
  root.findAll((n) => (n.type as unknown) === 'View').map((n) => [n.props.style].flat(3).find((s) => s && typeof s === 'object' && 'backgroundColor' in s)?.backgroundColor).filter(Boolean);

describe('ChartFrame', () => {
  it('renders nothing until it knows its width, then children(width) with the width floored', () => {
    const children = jest.fn((w: number) => <Text testID="inner">{`w=${w}`}</Text>);
    render(<ChartFrame title="I-V curve" caption="Dots: measured" height={260} testID="frame">{children}</ChartFrame>);
    expect(screen.queryByTestId('inner')).toBeNull();
    expect(screen.getByText('I-V curve')).toBeOnTheScreen();
    expect(screen.getByText('Dots: measured')).toBeOnTheScreen();
    layOut('frame', 358.7);
    expect(screen.getByTestId('inner')).toHaveTextContent('w=358');
    // A change of 2 px or less is ignored (no re-render loop while the page settles).
    layOut('frame', 360.4);
    expect(screen.getByTestId('inner')).toHaveTextContent('w=358');
    layOut('frame', 390);
    expect(screen.getByTestId('inner')).toHaveTextContent('w=390');
  });

  it('offers no download links off the web (the native test renderer)', () => {
    render(<ChartFrame height={100} download={{ name: 'KF-1', kind: 'iv' }} testID="frame">{() => null}</ChartFrame>);
    expect(screen.queryByTestId('frame-svg')).toBeNull();
  });
});

describe('IvChart on victory-native 36 / react-native-svg', () => {
  // Four points of the 57 mm reference cell (reference-data CSV, rounded).
  const measured = { voltage_v: [0.0057, 0.2, 0.4, 0.5728], current_a: [0.7605, 0.755, 0.72, 0] };
  const model = { voltage_v: [0, 0.3, 0.58], current_a: [0.76, 0.74, -0.01] };
  const second = { voltage_v: [0, 0.3, 0.58], current_a: [0.761, 0.741, -0.011] };

  it('I-V mode: axes labelled with units and pinned to the plot edges, not crossing at 0 V', () => {
    render(<IvChart measured={measured} mpp={{ v: 0.45, i: 0.69 }} mode="iv" testID="chart" />);
    layOut('chart', 390);
    const labels = svgLabels(screen.getByTestId('chart'));
    expect(labels).toContain('Voltage (V)');
    expect(labels).toContain('Current (A)');
    const axes = screen.UNSAFE_getAllByType(VictoryAxis);
    expect(axes).toHaveLength(2);
    for (const a of axes) expect(a.props.crossAxis).toBe(false);
    expect(axes.find((a) => a.props.dependentAxis)?.props.offsetX).toBe(chartStyle.padding.left);
    expect(axes.find((a) => !a.props.dependentAxis)?.props.offsetY).toBe(chartStyle.padding.bottom);
  });

  it('P-V mode labels the power axis in watts', () => {
    render(<IvChart measured={measured} mode="pv" testID="chart" />);
    layOut('chart', 1024);
    const labels = svgLabels(screen.getByTestId('chart'));
    expect(labels).toContain('Power (W)');
    expect(labels).not.toContain('Current (A)');
  });

  it('draws the model lines after (over) the measured points, the maximum power point last', () => {
    render(<IvChart measured={measured} model={model} second={second} mpp={{ v: 0.45, i: 0.69 }} mode="iv" testID="chart" />);
    layOut('chart', 390);
    const order = screen.UNSAFE_root.findAll((n) => n.type === VictoryScatter || n.type === VictoryLine, { deep: true }).map((n) =>
      n.type === VictoryLine ? `line ${n.props.style.data.stroke}` : n.props.symbol === 'diamond' ? 'mpp' : 'points',
    );
    expect(order).toEqual(['points', `line ${theme.color.hole}`, `line ${theme.color.electron}`, 'mpp']);
  });

  it('legend: one entry a series, its mark in the series colour; the translated label replaces the model name', () => {
    render(<IvChart measured={measured} model={model} mpp={{ v: 0.45, i: 0.69 }} mode="iv" labels={{ model: 'translated' }} testID="chart" />);
    const legend = screen.getByTestId('chart-legend');
    expect(within(legend).getAllByText(/./).map((t) => t.props.children)).toEqual(['measured', 'translated', 'maximum power point']);
    expect(fills(legend)).toEqual([chartStyle.measured.data.fill, chartStyle.model.data.stroke, chartStyle.mpp.data.fill]);
  });

  it('a touch reads the nearest measured point: V, I and P with units, in a live region', () => {
    render(<IvChart measured={measured} model={model} mode="iv" testID="chart" />);
    layOut('chart', 390);
    const readout = screen.getByTestId('chart-readout');
    expect(readout).toHaveTextContent(/Point at the I-V chart/);
    expect(readout.props['aria-live']).toBe('polite');
    // Touch 4 px right of where the third point (0.4 V, 0.72 A) is drawn.
    const domain = domainOf([measured.voltage_v.map((v, k) => ({ x: v, y: measured.current_a[k] })), model.voltage_v.map((v, k) => ({ x: v, y: model.current_a[k] }))]);
    const at = toPixel({ width: 390, height: 260, padding: chartStyle.padding, domain }, { x: 0.4, y: 0.72 });
    act(() => {
      screen.getByTestId('chart-plot').props.onResponderGrant({ nativeEvent: { locationX: at.px + 4, locationY: at.py } });
    });
    // P = 0.4 × 0.72 = 0.288 W (by hand).
    expect(screen.getByTestId('chart-readout')).toHaveTextContent('V = 0.4000 V · I = 0.7200 A · P = 0.2880 W');
    expect(screen.getByTestId('chart-marker')).toBeOnTheScreen();
    // Far outside the plotting area (in the axis labels) nothing is read.
    act(() => {
      screen.getByTestId('chart-plot').props.onResponderMove({ nativeEvent: { locationX: 2, locationY: 250 } });
    });
    expect(screen.getByTestId('chart-readout')).toHaveTextContent(/Point at the I-V chart/);
    expect(screen.queryByTestId('chart-marker')).toBeNull();
  });
});

describe('OverlayChart', () => {
  type Severity = 'pass' | 'warn' | 'fail';
  const curve = (id: string, severity: Severity, scale: number) => ({ id, device_id: `DEV-${id}`, severity, voltage_v: [0, 0.3, 0.6], current_a: [scale, scale * 0.95, 0] });

  it('colours only the failing and warning curves, and the legend counts exactly those', () => {
    const curves = [curve('1', 'pass', 9), curve('2', 'fail', 8.5), curve('3', 'pass', 9.1), curve('4', 'warn', 7), curve('5', 'warn', 8.8), curve('6', 'pass', 9.05), curve('7', 'warn', 8)];
    render(<OverlayChart curves={curves} testID="overlay" />);
    layOut('overlay', 600);
    const strokes = screen.UNSAFE_getAllByType(VictoryLine).map((l) => l.props.style.data.stroke);
    expect(strokes.filter((s) => s === theme.color.danger)).toHaveLength(1);
    expect(strokes.filter((s) => s === theme.color.hole)).toHaveLength(3);
    expect(strokes.filter((s) => s === theme.color.muted)).toHaveLength(3);
    // Grey ones first, so the coloured ones are drawn on top; the failing one last of all.
    expect(strokes.slice(0, 3)).toEqual([theme.color.muted, theme.color.muted, theme.color.muted]);
    expect(strokes[strokes.length - 1]).toBe(theme.color.danger);
    expect(within(screen.getByTestId('overlay-legend')).getAllByText(/./).map((t) => t.props.children)).toEqual(['1 failing', '3 with warnings', '3 passing']);
  });
});
