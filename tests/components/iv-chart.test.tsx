import { fireEvent, render, screen } from '@testing-library/react-native';
import { Text } from 'react-native';
import type { ReactTestInstance } from 'react-test-renderer';
import { ChartFrame } from '@/components/chart-frame';
import { IvChart } from '@/components/iv-chart';

/** Fires a layout event of the given width (px) on a child element of `parent`. */
function layOut(parent: ReactTestInstance, childIndex: number, width: number) {
  const child = parent.children[childIndex];
  if (typeof child === 'string') throw new Error('expected an element, got text');
  fireEvent(child, 'layout', { nativeEvent: { layout: { x: 0, y: 0, width, height: 260 } } });
}

/** SVG text is not host Text: read the labels off react-native-svg's TSpan elements. */
const svgLabels = (root: ReactTestInstance) => root.findAll((n) => (n.type as unknown) === 'RNSVGTSpan').map((n) => String(n.props.content));

describe('ChartFrame', () => {
  it('renders nothing until it knows its width, then children(width) with the width floored', () => {
    const children = jest.fn((w: number) => <Text testID="inner">{`w=${w}`}</Text>);
    render(<ChartFrame title="I-V curve" caption="Dots: measured" height={260} testID="frame">{children}</ChartFrame>);
    expect(screen.queryByTestId('inner')).toBeNull();
    expect(screen.getByText('I-V curve')).toBeOnTheScreen();
    expect(screen.getByText('Dots: measured')).toBeOnTheScreen();
    // The measuring view is the frame's second child (after the title).
    layOut(screen.getByTestId('frame'), 1, 358.7);
    expect(screen.getByTestId('inner')).toHaveTextContent('w=358');
    // A change of 2 px or less is ignored (no re-render loop while the page settles).
    layOut(screen.getByTestId('frame'), 1, 360.4);
    expect(screen.getByTestId('inner')).toHaveTextContent('w=358');
    layOut(screen.getByTestId('frame'), 1, 390);
    expect(screen.getByTestId('inner')).toHaveTextContent('w=390');
  });
});

describe('IvChart (smoke render on victory-native 36 / react-native-svg)', () => {
  // Three points of the 57 mm reference cell (reference-data CSV, rounded).
  const measured = { voltage_v: [0.0057, 0.4, 0.5728], current_a: [0.7605, 0.72, 0] };

  it('I-V mode: axes labelled with units once it has a width', () => {
    render(<IvChart measured={measured} mpp={{ v: 0.45, i: 0.69 }} mode="iv" testID="chart" />);
    layOut(screen.getByTestId('chart'), 0, 390);
    const labels = svgLabels(screen.getByTestId('chart'));
    expect(labels).toContain('Voltage (V)');
    expect(labels).toContain('Current (A)');
  });

  it('P-V mode labels the power axis in watts', () => {
    render(<IvChart measured={measured} mode="pv" testID="chart" />);
    layOut(screen.getByTestId('chart'), 0, 1024);
    const labels = svgLabels(screen.getByTestId('chart'));
    expect(labels).toContain('Power (W)');
    expect(labels).not.toContain('Current (A)');
  });
});
