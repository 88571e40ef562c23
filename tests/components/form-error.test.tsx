/**
 * Errors name the field as the form labels it, once, at the field: the failed request's message
 * under a form (FormError) in words instead of keys, and the string-sizing form's own and the
 * server's errors placed at their fields. Messages and labels from lib/vocabulary.ts and
 * lib/schemas (the expected strings are those rules written out by hand).
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { act, fireEvent, render, screen, waitFor } from '@testing-library/react-native';
import type { ReactNode } from 'react';
import { FormError } from '@/components/form-error';
import { StringForm } from '@/components/string-form';
import { batchKeys } from '@/lib/api/keys';
import { ApiError } from '@/lib/api/client';

describe('FormError', () => {
  it('an engine\'s refusal (invalid_input) reads in words: labels instead of keys', () => {
    render(<FormError error={new ApiError(400, 'invalid_input', "temp_k = −26.85 K is outside the crystalline silicon model's range 150–500 K", { input: 'temp_k' })} />);
    expect(screen.getByTestId('form-error')).toHaveTextContent("Temperature = −26.85 K is outside the crystalline silicon model's range 150–500 K");
    expect(screen.queryByText(/temp_k/)).toBeNull();
  });

  it('a message of another kind is shown as the server wrote it', () => {
    render(<FormError error={new ApiError(409, 'name_taken', 'A batch with that name already exists.')} />);
    expect(screen.getByTestId('form-error')).toHaveTextContent('A batch with that name already exists.');
  });

  it('nothing without an error', () => {
    render(<FormError error={null} />);
    expect(screen.queryByTestId('form-error')).toBeNull();
  });
});

describe('StringForm: one error, at its field, and no stale result', () => {
  const qc = () => {
    const c = new QueryClient({ defaultOptions: { queries: { retry: false, staleTime: Infinity } } });
    c.setQueryData(batchKeys.list(), { batches: [] });
    return c;
  };
  const renderForm = (props: Partial<Parameters<typeof StringForm>[0]> = {}) => {
    const client = qc();
    const onSubmit = jest.fn();
    const onInvalid = jest.fn();
    const wrapper = ({ children }: { children: ReactNode }) => <QueryClientProvider client={client}>{children}</QueryClientProvider>;
    const view = render(<StringForm onSubmit={onSubmit} onInvalid={onInvalid} busy={false} serverError={null} summary={null} wide={false} {...props} />, { wrapper });
    return { onSubmit, onInvalid, view, wrapper };
  };
  const type = (label: string, value: string) => fireEvent.changeText(screen.getByLabelText(label), value);

  it('an MPP window upside down is said once, at "MPP window to (V)", and the screen is told to drop its result', async () => {
    const { onSubmit, onInvalid } = renderForm();
    fireEvent.press(screen.getByTestId('source-typed'));
    type('Voc at STC (V)', '49.5');
    type('Voc coefficient (%/K)', '-0.29');
    type('Record low ambient (°C)', '-15');
    type('Hottest cell temperature (°C)', '70');
    fireEvent.press(screen.getByTestId('vsys-1500'));
    type('MPP window from (V)', '900');
    type('MPP window to (V)', '500');
    fireEvent.press(screen.getByTestId('size-submit'));
    const message = 'MPP window to (V) must be above MPP window from (900 V).';
    expect(await screen.findByText(message)).toBeOnTheScreen();
    expect(screen.getAllByText(message)).toHaveLength(1);
    expect(screen.getAllByRole('alert')).toHaveLength(1);
    expect(screen.queryByTestId('form-error')).toBeNull();
    expect(onSubmit).not.toHaveBeenCalled();
    expect(onInvalid).toHaveBeenCalled();
  });

  it('typing a word where a number belongs drops the previous result at once', () => {
    const { onInvalid } = renderForm();
    fireEvent.press(screen.getByTestId('source-typed'));
    onInvalid.mockClear();
    type('Record low ambient (°C)', 'cold');
    expect(onInvalid).toHaveBeenCalled();
  });

  it('the server\'s refusal naming a field on the form is shown at that field in its label\'s words, not by the button', async () => {
    const { view } = renderForm();
    fireEvent.press(screen.getByTestId('source-typed'));
    const serverError = { message: 't_cell_max_c (−5 °C) is below t_min_c (10 °C): the two look swapped', at: 1 };
    view.rerender(<StringForm onSubmit={jest.fn()} onInvalid={jest.fn()} busy={false} serverError={serverError} summary={null} wide={false} />);
    await act(async () => {});
    const shown = 'Hottest cell temperature (−5 °C) is below Record low ambient (10 °C): the two look swapped';
    await waitFor(() => expect(screen.getByText(shown)).toBeOnTheScreen());
    expect(screen.getAllByText(shown)).toHaveLength(1);
    expect(screen.queryByTestId('form-error')).toBeNull();
    expect(screen.queryByText(/t_cell_max_c|t_min_c/)).toBeNull();
  });

  it('a refusal about a field the form does not show (the batch\'s Voc) is said once by the button', async () => {
    const { view } = renderForm();
    view.rerender(<StringForm onSubmit={jest.fn()} onInvalid={jest.fn()} busy={false} serverError={{ message: 'voc_stc_v is missing: enter the module’s Voc at STC in V', at: 2 }} summary={null} wide={false} />);
    expect(await screen.findByTestId('form-error')).toHaveTextContent(/Voc at STC is missing: enter the module’s Voc at STC in V/);
    expect(screen.getAllByText(/Voc at STC is missing/)).toHaveLength(1);
  });
});
