import { render, screen } from '@testing-library/react-native';
import { FileMetadata } from '@/components/file-metadata';

// Invented metadata, as the reader keeps it (lib/iv/parse-meta.ts).
describe('FileMetadata', () => {
  it('lists the kept keys and values as the file wrote them, and the irradiance column’s mean and change', () => {
    render(
      <FileMetadata
        meta={{ irradiance_w_m2: 1002.5, irradiance_spread_pct: 3.4913, extra: [{ key: 'Operator', value: 'Doe, J.' }, { key: 'Lamp hours', value: '1203 h' }] }}
      />,
    );
    expect(screen.getByText('File metadata')).toBeOnTheScreen();
    expect(screen.getByText('Operator')).toBeOnTheScreen();
    expect(screen.getByText('Doe, J.')).toBeOnTheScreen();
    expect(screen.getByText('1203 h')).toBeOnTheScreen();
    // Irradiance to 4 significant digits, the change to one decimal (lib/vocabulary.ts).
    expect(screen.getByTestId('irradiance-column')).toHaveTextContent('Irradiance column: mean 1003 W/m², changing by 3.5 % of the mean during the sweep.');
  });

  it('shows nothing when the file had neither', () => {
    render(<FileMetadata meta={{ device_id: 'X', temp_c: 25 }} />);
    expect(screen.queryByTestId('file-metadata')).toBeNull();
  });
});
