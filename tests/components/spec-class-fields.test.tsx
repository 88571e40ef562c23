/** The spec editor's power classes on screen: choosing bins, typing rows, their words, adding and removing rows. */
import { fireEvent, render, screen } from '@testing-library/react-native';
import { useState } from 'react';
import { SpecClassFields } from '@/components/spec-class-fields';
import { powerClassFields, powerClassFormOf } from '@/lib/schemas/power-class-form';
import type { PowerClassForm } from '@/lib/schemas/power-class-form';
import type { PowerClasses } from '@/lib/quality/spec';

let latest: PowerClassForm;
function Harness({ start, problems }: { start?: PowerClasses; problems?: string[] }) {
  const [f, setF] = useState(() => powerClassFormOf(start));
  latest = f;
  return <SpecClassFields value={f} onChange={setF} problems={problems} />;
}

describe('SpecClassFields', () => {
  it('bins around the nameplate: one empty row to start, words per row, the next row starts where the last ends', () => {
    render(<Harness />);
    expect(screen.queryByTestId('bin-row-0')).toBeNull();
    fireEvent.press(screen.getByTestId('class-mode-nameplate_bins'));
    expect(screen.getByTestId('bin-row-0-words')).toHaveTextContent('Give a lower end below the upper end to see what this class holds.');
    fireEvent.changeText(screen.getByTestId('bin-row-0-label'), 'B');
    fireEvent.changeText(screen.getByTestId('bin-row-0-from'), '0');
    fireEvent.changeText(screen.getByTestId('bin-row-0-to'), '5');
    // Basis: Pmax at STC by default for a new spec.
    expect(screen.getByTestId('bin-row-0-words')).toHaveTextContent('Class B: Pmax at STC at least the nameplate and below nameplate + 5 W.');
    fireEvent.press(screen.getByTestId('bin-add'));
    expect(screen.getByTestId('bin-row-1-from').props.value).toBe('5');
    fireEvent.changeText(screen.getByTestId('bin-row-1-label'), 'A');
    fireEvent.changeText(screen.getByTestId('bin-row-1-to'), '10');
    fireEvent.press(screen.getByTestId('bin-unit-pct'));
    expect(screen.getByTestId('bin-row-1-words')).toHaveTextContent('Class A: Pmax at STC at least nameplate + 5 % and below nameplate + 10 %.');
    expect(powerClassFields(latest).power_classes).toEqual({ basis: 'stc_pmp_w', nameplate_bins: [{ label: 'B', from_pct: 0, to_pct: 5 }, { label: 'A', from_pct: 5, to_pct: 10 }] });
    fireEvent.press(screen.getByTestId('bin-row-0-remove'));
    expect(latest.rows).toEqual([{ label: 'A', from: '5', to: '10' }]);
    expect(screen.queryByTestId('bin-row-1')).toBeNull();
  });

  it('marks the rows a message names', () => {
    render(<Harness start={{ nameplate_bins: [{ label: 'A', from_w: 0, to_w: 5 }, { label: 'B', from_w: 3, to_w: 8 }] }} problems={['Power class row 2 (B) from (W): overlaps row 1 (A), which reaches +5 W; start it at +5 W or later']} />);
    expect(screen.getByTestId('bin-row-1').props['aria-invalid']).toBe(true);
    expect(screen.getByTestId('bin-row-0').props['aria-invalid']).toBeUndefined();
  });

  it('classes in absolute watts are kept, said so, and can be replaced', () => {
    render(<Harness start={{ bins: [{ label: 'X', nominal_w: 300, min_w: 295, max_w: 305 }] }} />);
    expect(screen.getByTestId('class-kept')).toHaveTextContent(/are 1 bin in absolute watts/);
    fireEvent.press(screen.getByTestId('class-mode-steps'));
    fireEvent.changeText(screen.getByTestId('class-step'), '5');
    // The saved classes named no basis, which the engine reads as measured Pmax: that stays.
    expect(powerClassFields(latest).power_classes).toEqual({ step_w: 5, basis: 'pmp_w' });
    fireEvent.press(screen.getByTestId('class-mode-kept'));
    expect(powerClassFields(latest).power_classes).toEqual({ bins: [{ label: 'X', nominal_w: 300, min_w: 295, max_w: 305 }] });
  });

  it('steps with a tolerance and ends set through the API: said in words, saved again with a new step', () => {
    render(<Harness start={{ step_w: 5, basis: 'stc_pmp_w', tolerance: { minus_w: 2, plus_w: 3 }, lowest_w: 395, highest_w: 420, label_prefix: 'M' }} />);
    const words = screen.getByTestId('class-step-words');
    expect(words).toHaveTextContent(/class MN when N − 2 W ≤ Pmax at STC < N \+ 3 W/);
    expect(words).toHaveTextContent(/The lowest class is M395/);
    expect(words).toHaveTextContent(/The highest class is M420/);
    fireEvent.changeText(screen.getByTestId('class-step'), '10');
    expect(powerClassFields(latest).power_classes).toEqual({ step_w: 10, basis: 'stc_pmp_w', tolerance: { minus_w: 2, plus_w: 3 }, lowest_w: 395, highest_w: 420, label_prefix: 'M' });
  });
});
