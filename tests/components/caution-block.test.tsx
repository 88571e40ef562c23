import { fireEvent, render, screen } from '@testing-library/react-native';
import { CautionBlock } from '@/components/caution-block';
import { HV_CAUTION } from '@/lib/strings/cautions';

describe('CautionBlock', () => {
  it('compact by default: the title and the one-line caution, no bullets', () => {
    render(<CautionBlock />);
    const block = screen.getByTestId('hv-caution');
    expect(block).toHaveTextContent(HV_CAUTION.title, { exact: false });
    expect(screen.getByText(HV_CAUTION.short)).toBeOnTheScreen();
    for (const b of HV_CAUTION.bullets) expect(screen.queryByText(b, { exact: false })).toBeNull();
    expect(screen.getByTestId('hv-caution-toggle')).toHaveTextContent('Read');
  });

  it('pressing Read shows every bullet of HV_CAUTION; Less folds it again', () => {
    render(<CautionBlock />);
    fireEvent.press(screen.getByTestId('hv-caution-toggle'));
    expect(HV_CAUTION.bullets.length).toBeGreaterThanOrEqual(5);
    for (const b of HV_CAUTION.bullets) expect(screen.getByText(b, { exact: false })).toBeOnTheScreen();
    expect(screen.queryByText(HV_CAUTION.short)).toBeNull();
    expect(screen.getByText(HV_CAUTION.title)).toBeOnTheScreen();
    expect(screen.getByTestId('hv-caution-toggle')).toHaveTextContent('Less');

    fireEvent.press(screen.getByTestId('hv-caution-toggle'));
    expect(screen.getByText(HV_CAUTION.short)).toBeOnTheScreen();
    expect(screen.queryByText(HV_CAUTION.bullets[0], { exact: false })).toBeNull();
  });

  it('expanded starts open and mentions the 60 V extra-low-voltage limit', () => {
    render(<CautionBlock expanded />);
    expect(screen.getAllByText(/^•/)).toHaveLength(HV_CAUTION.bullets.length);
    expect(screen.getByText(/above 60 V DC/)).toBeOnTheScreen();
  });

  it('carries the alert role (role="alert" on the web build) and its toggle is a button', () => {
    render(<CautionBlock />);
    // RNTL's getByRole only matches views marked accessible (native semantics); react-native-web
    // turns accessibilityRole into role="alert" either way, so check the prop itself.
    expect(screen.getByTestId('hv-caution')).toHaveProp('accessibilityRole', 'alert');
    expect(screen.getByRole('button', { name: 'Read' })).toBeOnTheScreen();
  });
});
