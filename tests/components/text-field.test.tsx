import { zodResolver } from '@hookform/resolvers/zod';
import { fireEvent, render, screen, waitFor } from '@testing-library/react-native';
import { useForm } from 'react-hook-form';
import { View } from 'react-native';
import { Button } from '@/components/button';
import { TextField } from '@/components/text-field';
import { theme } from '@/components/theme';
import { signInSchema } from '@/lib/schemas/auth';
import type { SignInInput } from '@/lib/schemas/auth';

/** The sign-in form's shape, written for this test: two TextFields and a submit button. */
function SignInForm({ onValid }: { onValid: (v: SignInInput) => void }) {
  const { control, handleSubmit } = useForm<SignInInput>({ resolver: zodResolver(signInSchema), defaultValues: { email: '', password: '' } });
  return (
    <View>
      <TextField control={control} name="email" label="E-mail" hint="The address your account was made with." autoCapitalize="none" />
      <TextField control={control} name="password" label="Password" secureTextEntry />
      <Button label="Sign in" onPress={handleSubmit(onValid)} />
    </View>
  );
}

describe('TextField with react-hook-form + zod (signInSchema)', () => {
  it('shows the label and the hint, and the input is named by its label', () => {
    render(<SignInForm onValid={jest.fn()} />);
    expect(screen.getByText('E-mail')).toBeOnTheScreen();
    expect(screen.getByText('The address your account was made with.')).toBeOnTheScreen();
    expect(screen.getByLabelText('E-mail')).toHaveProp('autoCapitalize', 'none');
    expect(screen.getByLabelText('Password')).toHaveProp('secureTextEntry', true);
  });

  it("an empty submitted form shows the schema's messages and does not submit", async () => {
    const onValid = jest.fn();
    render(<SignInForm onValid={onValid} />);
    fireEvent.press(screen.getByRole('button', { name: 'Sign in' }));
    // Messages from lib/schemas/auth.ts.
    expect(await screen.findByText('Enter an e-mail address.')).toBeOnTheScreen();
    expect(screen.getByText('Enter your password.')).toBeOnTheScreen();
    // The error replaces the hint and marks the input's border.
    expect(screen.queryByText('The address your account was made with.')).toBeNull();
    expect(screen.getByLabelText('E-mail')).toHaveStyle({ borderColor: theme.color.danger });
    expect(onValid).not.toHaveBeenCalled();
  });

  it('a malformed address keeps the e-mail message; a fixed one clears it and submits the values', async () => {
    const onValid = jest.fn();
    render(<SignInForm onValid={onValid} />);
    fireEvent.changeText(screen.getByLabelText('E-mail'), 'qa.lead-at-example.com');
    fireEvent.changeText(screen.getByLabelText('Password'), 'correct horse');
    fireEvent.press(screen.getByRole('button', { name: 'Sign in' }));
    expect(await screen.findByText('Enter an e-mail address.')).toBeOnTheScreen();
    expect(screen.queryByText('Enter your password.')).toBeNull();
    expect(onValid).not.toHaveBeenCalled();

    fireEvent.changeText(screen.getByLabelText('E-mail'), 'qa.lead@example.com');
    expect(screen.getByLabelText('E-mail')).toHaveDisplayValue('qa.lead@example.com');
    fireEvent.press(screen.getByRole('button', { name: 'Sign in' }));
    await waitFor(() => expect(onValid).toHaveBeenCalledTimes(1));
    expect(onValid.mock.calls[0][0]).toEqual({ email: 'qa.lead@example.com', password: 'correct horse' });
    expect(screen.queryByText('Enter an e-mail address.')).toBeNull();
  });
});
