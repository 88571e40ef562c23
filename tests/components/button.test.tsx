import { fireEvent, render, screen } from '@testing-library/react-native';
import { ActivityIndicator } from 'react-native';
import { Button } from '@/components/button';

describe('Button', () => {
  it('calls onPress once per press when idle, and says it is an enabled button', () => {
    const onPress = jest.fn();
    render(<Button label="Save limits" onPress={onPress} />);
    const button = screen.getByRole('button', { name: 'Save limits' });
    expect(button).toBeEnabled();
    expect(button).not.toBeBusy();
    fireEvent.press(button);
    fireEvent.press(button);
    expect(onPress).toHaveBeenCalledTimes(2);
  });

  it('while busy: ignores presses, shows a spinner and reports busy + disabled to assistive tech', () => {
    const onPress = jest.fn();
    render(<Button label="Uploading" busy onPress={onPress} />);
    const button = screen.getByRole('button', { name: 'Uploading' });
    fireEvent.press(button);
    expect(onPress).not.toHaveBeenCalled();
    expect(button).toBeBusy();
    expect(button).toBeDisabled();
    expect(button.props.accessibilityState).toEqual({ disabled: true, busy: true });
    expect(screen.UNSAFE_queryAllByType(ActivityIndicator)).toHaveLength(1);
  });

  it('disabled without busy: ignores presses, no spinner, not busy', () => {
    const onPress = jest.fn();
    render(<Button label="Release batch" disabled onPress={onPress} />);
    const button = screen.getByRole('button', { name: 'Release batch' });
    fireEvent.press(button);
    expect(onPress).not.toHaveBeenCalled();
    expect(button).toBeDisabled();
    expect(button).not.toBeBusy();
    expect(screen.UNSAFE_queryAllByType(ActivityIndicator)).toHaveLength(0);
  });

  it('passes other Pressable props through (testID)', () => {
    render(<Button label="Cancel" kind="quiet" testID="cancel-button" />);
    expect(screen.getByTestId('cancel-button')).toHaveTextContent('Cancel');
  });
});
