import { render, screen } from '@testing-library/react-native';
import { FlagChip } from '@/components/flag-chip';
import { theme } from '@/components/theme';
import type { Flag } from '@/lib/iv/types';

describe('FlagChip', () => {
  it.each([
    // Colours from components/flag-chip.tsx's TONE table.
    ['fail', 'isc-extrapolated', theme.color.danger],
    ['warn', 'step-in-curve', '#7A4E00'],
    ['info', 'temperature-assumed', theme.color.inkSoft],
  ] as const)('%s: shows the code in its tone', (severity, code, colour) => {
    render(<FlagChip flag={{ code, severity }} />);
    const label = screen.getByText(code);
    expect(label).toHaveStyle({ color: colour, fontSize: 11 });
  });

  it('an unknown severity falls back to the quiet info tone instead of crashing', () => {
    const odd = { code: 'future-flag', severity: 'notice' } as unknown as Pick<Flag, 'code' | 'severity'>;
    render(<FlagChip flag={odd} />);
    expect(screen.getByText('future-flag')).toHaveStyle({ color: theme.color.inkSoft });
  });
});
