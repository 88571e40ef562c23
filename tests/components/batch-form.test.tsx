import { fireEvent, render, screen, waitFor } from '@testing-library/react-native';
import { BatchForm } from '@/components/batch-form';
import type { Batch } from '@/lib/api/batches';
import { ApiError } from '@/lib/api/client';

const renderForm = (props: Partial<Parameters<typeof BatchForm>[0]> = {}) => {
  const onSubmit = jest.fn();
  render(<BatchForm submitLabel="Create batch" busy={false} error={null} onSubmit={onSubmit} {...props} />);
  return onSubmit;
};
const submit = () => fireEvent.press(screen.getByTestId('batch-submit'));

describe('BatchForm', () => {
  it('an empty name shows "Give the batch a name." and does not call onSubmit', async () => {
    const onSubmit = renderForm();
    submit();
    // Message from batchCreateSchema (lib/schemas/curves.ts).
    expect(await screen.findByText('Give the batch a name.')).toBeOnTheScreen();
    expect(onSubmit).not.toHaveBeenCalled();
  });

  it('a name of spaces only is still empty (the schema trims)', async () => {
    const onSubmit = renderForm();
    fireEvent.changeText(screen.getByTestId('batch-name'), '   ');
    submit();
    expect(await screen.findByText('Give the batch a name.')).toBeOnTheScreen();
    expect(onSubmit).not.toHaveBeenCalled();
  });

  it('a valid form calls onSubmit once with parsed numbers and nulls for blanks', async () => {
    const onSubmit = renderForm();
    fireEvent.changeText(screen.getByTestId('batch-name'), '  Line 2, lot 2611  ');
    fireEvent.changeText(screen.getByLabelText('Cells in series'), '60');
    fireEvent.changeText(screen.getByLabelText('Area (cm²)'), '16600');
    fireEvent.changeText(screen.getByLabelText('Nameplate power (W)'), '405,5'); // decimal comma accepted
    fireEvent.changeText(screen.getByLabelText('Batch date'), '2025-11-14');
    fireEvent.changeText(screen.getByLabelText('Cell supplier'), 'Supplier B');
    submit();
    await waitFor(() => expect(onSubmit).toHaveBeenCalledTimes(1));
    expect(onSubmit.mock.calls[0][0]).toEqual({
      name: 'Line 2, lot 2611',
      product_type: null,
      supplier: 'Supplier B',
      line: null,
      lot: null,
      batch_date: '2025-11-14',
      cells: 60,
      area_cm2: 16600,
      nameplate_w: 405.5,
      irradiance_w_m2: null,
      alpha_pct_per_k: null,
      beta_pct_per_k: null,
      gamma_pct_per_k: null,
      rs_ohm: null,
      kappa_ohm_per_k: null,
      description: null,
    });
  });

  it('the module type’s coefficients for the STC figures are read as numbers (typographic minus too)', async () => {
    const onSubmit = renderForm();
    fireEvent.changeText(screen.getByTestId('batch-name'), 'Coefficients');
    fireEvent.changeText(screen.getByLabelText('α, Isc temperature coefficient (%/K)'), '0,05');
    fireEvent.changeText(screen.getByLabelText('β, Voc temperature coefficient (%/K)'), '−0.29');
    fireEvent.changeText(screen.getByLabelText('γ, Pmax temperature coefficient (%/K)'), '-0.37');
    fireEvent.changeText(screen.getByLabelText('Rs for IEC 60891 (Ω)'), '0.35');
    fireEvent.changeText(screen.getByLabelText('Irradiance when a file does not say (W/m²)'), '1000');
    submit();
    await waitFor(() => expect(onSubmit).toHaveBeenCalledTimes(1));
    expect(onSubmit.mock.calls[0][0]).toMatchObject({ alpha_pct_per_k: 0.05, beta_pct_per_k: -0.29, gamma_pct_per_k: -0.37, rs_ohm: 0.35, kappa_ohm_per_k: null, irradiance_w_m2: 1000 });
  });

  it('numbers typed with units reach onSubmit in the fields’ own units (mathjs: 1 m² = 10⁴ cm², k = 10³)', async () => {
    const onSubmit = renderForm();
    fireEvent.changeText(screen.getByTestId('batch-name'), 'With units');
    fireEvent.changeText(screen.getByLabelText('Area (cm²)'), '1.661 m²');
    fireEvent.changeText(screen.getByLabelText('Nameplate power (W)'), '0.33 kW');
    fireEvent.changeText(screen.getByLabelText('β, Voc temperature coefficient (%/K)'), '-0.29 %/°C');
    fireEvent.changeText(screen.getByLabelText('Rs for IEC 60891 (Ω)'), '350 mΩ');
    submit();
    await waitFor(() => expect(onSubmit).toHaveBeenCalledTimes(1));
    const v = onSubmit.mock.calls[0][0];
    expect(v.area_cm2).toBeCloseTo(16610, 9);
    expect(v.nameplate_w).toBeCloseTo(330, 9);
    expect(v.beta_pct_per_k).toBeCloseTo(-0.29, 12);
    expect(v.rs_ohm).toBeCloseTo(0.35, 12);
  });

  it('a unit of another quantity is refused at its field, naming it', async () => {
    const onSubmit = renderForm();
    fireEvent.changeText(screen.getByTestId('batch-name'), 'Wrong unit');
    fireEvent.changeText(screen.getByLabelText('β, Voc temperature coefficient (%/K)'), '-120 mV/K');
    submit();
    expect(await screen.findByText(/^β, Voc temperature coefficient \(%\/K\): "mV\/K" is not a unit of relative per kelvin/)).toBeOnTheScreen();
    expect(onSubmit).not.toHaveBeenCalled();
  });

  it('a positive β is refused, naming the field as the form labels it', async () => {
    const onSubmit = renderForm();
    fireEvent.changeText(screen.getByTestId('batch-name'), 'Coefficients');
    fireEvent.changeText(screen.getByLabelText('β, Voc temperature coefficient (%/K)'), '0.3');
    submit();
    expect(await screen.findByText('β, Voc temperature coefficient (%/K) must be a number from -2 to 0.')).toBeOnTheScreen();
    expect(onSubmit).not.toHaveBeenCalled();
  });

  it.each([
    // Messages from batchFieldsSchema (lib/schemas/curves.ts).
    ['Cells in series', '60.5', 'Cells in series must be a whole number from 1 to 1000.'],
    ['Cells in series', 'sixty', 'Cells in series must be a whole number from 1 to 1000.'],
    ['Area (cm²)', '-3', 'Area (cm²) must be a number from 0.01 to 100000.'],
    ['Batch date', '14/11/2025', 'Batch date must be written yyyy-mm-dd.'],
    ['Batch date', '2026-02-30', 'Batch date 2026-02-30 is not a date in the calendar.'],
  ])('%s = "%s" is refused with a sentence', async (label, value, message) => {
    const onSubmit = renderForm();
    fireEvent.changeText(screen.getByTestId('batch-name'), 'Trial');
    fireEvent.changeText(screen.getByLabelText(label), value);
    submit();
    expect(await screen.findByText(message)).toBeOnTheScreen();
    expect(onSubmit).not.toHaveBeenCalled();
  });

  it('every field\'s error names the field as the form labels it (the key table\'s label and unit)', async () => {
    renderForm();
    fireEvent.changeText(screen.getByTestId('batch-name'), 'Trial');
    const bad: [string, string][] = [['Cells in series', 'x'], ['Area (cm²)', 'x'], ['Nameplate power (W)', 'x'], ['Batch date', 'x']];
    for (const [label, value] of bad) fireEvent.changeText(screen.getByLabelText(label), value);
    submit();
    const alerts = await screen.findAllByRole('alert');
    expect(alerts).toHaveLength(bad.length);
    const texts = alerts.map((a) => String(a.props.children));
    for (const [label] of bad) expect(texts.filter((t) => t.startsWith(`${label} must be`))).toHaveLength(1);
    for (const t of texts) expect(t).not.toMatch(/cells|area_cm2|nameplate_w|batch_date/);
  });

  it('editing: starts from the batch, shows the server error under the form, and is busy while saving', () => {
    const initial: Batch = {
      id: 'b1', name: 'Supplier A trial', product_type: null, supplier: 'A', line: null, lot: null, batch_date: null,
      cells: 72, area_cm2: 25_000, nameplate_w: 550, setup_id: null, description: null, archived: false, state: 'open',
      irradiance_w_m2: null, alpha_pct_per_k: 0.05, beta_pct_per_k: -0.29, gamma_pct_per_k: null, rs_ohm: null, kappa_ohm_per_k: null,
      created_at: '2025-11-14T08:00:00Z', updated_at: '2025-11-14T08:00:00Z',
    };
    const onSubmit = renderForm({ initial, busy: true, error: new ApiError(409, 'name_taken', 'A batch with that name already exists.'), onCancel: jest.fn() });
    expect(screen.getByTestId('batch-name')).toHaveDisplayValue('Supplier A trial');
    expect(screen.getByLabelText('Cells in series')).toHaveDisplayValue('72');
    expect(screen.getByLabelText('Area (cm²)')).toHaveDisplayValue('25000');
    expect(screen.getByLabelText('β, Voc temperature coefficient (%/K)')).toHaveDisplayValue('-0.29');
    expect(screen.getByTestId('form-error')).toHaveTextContent('A batch with that name already exists.');
    expect(screen.getByTestId('batch-submit')).toBeBusy();
    submit();
    expect(onSubmit).not.toHaveBeenCalled();
    expect(screen.getByRole('button', { name: 'Cancel' })).toBeOnTheScreen();
  });
});
