import { render, screen } from '@testing-library/react-native';
import { Figure } from '@/components/figure';
import { theme } from '@/components/theme';

describe('Figure', () => {
  it('shows label, value, ± uncertainty and note', () => {
    render(<Figure label="Rs" value="0.0365 Ω" plusMinus="0.0011 Ω" note="series resistance per device" testID="fig-rs" />);
    const fig = screen.getByTestId('fig-rs');
    expect(fig).toHaveTextContent('Rs', { exact: false });
    expect(screen.getByText('0.0365 Ω')).toBeOnTheScreen();
    expect(screen.getByText('± 0.0011 Ω')).toBeOnTheScreen();
    expect(screen.getByText('series resistance per device')).toBeOnTheScreen();
  });

  it('no ± line when the uncertainty is null (a parameter at a bound), no note when none', () => {
    render(<Figure label="n" value="1.48" plusMinus={null} testID="fig-n" />);
    expect(screen.queryByText(/±/)).toBeNull();
    expect(screen.getByTestId('fig-n')).toHaveTextContent('n1.48');
  });

  it('warn paints the value in the danger colour; otherwise ink', () => {
    const { rerender } = render(<Figure label="Voc" value="49.37 V" />);
    expect(screen.getByText('49.37 V')).toHaveStyle({ color: theme.color.ink });
    rerender(<Figure label="Voc" value="71.2 V" warn />);
    expect(screen.getByText('71.2 V')).toHaveStyle({ color: theme.color.danger });
  });
});
