import { fireEvent, render, screen } from '@testing-library/react-native';
import { Text } from 'react-native';
import { QueryState } from '@/components/query-state';
import { ApiError } from '@/lib/api/client';

type Q<T> = { isPending: boolean; isError: boolean; error: unknown; data: T | undefined; refetch: jest.Mock };

const pending = <T,>(): Q<T> => ({ isPending: true, isError: false, error: null, data: undefined, refetch: jest.fn() });
const failed = <T,>(error: unknown): Q<T> => ({ isPending: false, isError: true, error, data: undefined, refetch: jest.fn() });
const loaded = <T,>(data: T): Q<T> => ({ isPending: false, isError: false, error: null, data, refetch: jest.fn() });

const renderList = (query: Q<string[]>, empty?: string) =>
  render(
    <QueryState query={query} isEmpty={(d) => d.length === 0} empty={empty}>
      {(names) => <Text testID="data">{names.join(', ')}</Text>}
    </QueryState>,
  );

describe('QueryState', () => {
  it('loading: shows the loading state and not the children', () => {
    renderList(pending());
    expect(screen.getByTestId('state-loading')).toHaveTextContent('Loading…');
    expect(screen.queryByTestId('data')).toBeNull();
    expect(screen.queryByTestId('state-error')).toBeNull();
  });

  it("error: shows the server's message (via toUserMessage) as an alert, and Try again calls refetch", () => {
    const query = failed<string[]>(new ApiError(404, 'not_found', 'No batch with that id.'));
    renderList(query);
    const alert = screen.getByTestId('state-error');
    // role="alert" on the web build (see caution-block.test.tsx for why not getByRole).
    expect(alert).toHaveProp('accessibilityRole', 'alert');
    expect(alert).toHaveTextContent('No batch with that id.', { exact: false });
    expect(screen.queryByTestId('data')).toBeNull();
    fireEvent.press(screen.getByRole('button', { name: 'Try again' }));
    expect(query.refetch).toHaveBeenCalledTimes(1);
  });

  it.each([
    // Sentences from toUserMessage in lib/api/client.ts.
    ['429 from the server', new ApiError(429, 'rate_limited', 'slow down'), 'Too many attempts. Wait a minute and try again.'],
    ['wrong password', new ApiError(401, 'INVALID_EMAIL_OR_PASSWORD', 'Invalid email or password'), 'That e-mail and password do not match an account.'],
    ['a plain Error', new Error('The file has no current column.'), 'The file has no current column.'],
    ['something that is not an Error', 'boom', 'Something went wrong. Try again.'],
  ])('error from %s reads as a sentence', (_what, error, sentence) => {
    renderList(failed(error));
    expect(screen.getByTestId('state-error')).toHaveTextContent(sentence, { exact: false });
  });

  it('no error but no data either: treated as an error, not as children(undefined)', () => {
    renderList({ isPending: false, isError: false, error: null, data: undefined, refetch: jest.fn() });
    expect(screen.getByTestId('state-error')).toBeOnTheScreen();
    expect(screen.queryByTestId('data')).toBeNull();
  });

  it('empty: default sentence, or the caller’s', () => {
    const { unmount } = renderList(loaded([]));
    expect(screen.getByTestId('state-empty')).toHaveTextContent('Nothing here yet.');
    unmount();
    renderList(loaded([]), 'No batches yet. Upload I-V files to start one.');
    expect(screen.getByTestId('state-empty')).toHaveTextContent('No batches yet. Upload I-V files to start one.');
    expect(screen.queryByTestId('data')).toBeNull();
  });

  it('empty with a node: renders the node as given', () => {
    render(
      <QueryState query={loaded<string[]>([])} isEmpty={(d) => d.length === 0} empty={<Text testID="custom-empty">Drop files here</Text>}>
        {() => <Text>never</Text>}
      </QueryState>,
    );
    expect(screen.getByTestId('custom-empty')).toHaveTextContent('Drop files here');
    expect(screen.queryByText('never')).toBeNull();
  });

  it('data: renders children(data) and none of the states', () => {
    renderList(loaded(['Line 2 lot 2611', 'Supplier B trial']));
    expect(screen.getByTestId('data')).toHaveTextContent('Line 2 lot 2611, Supplier B trial');
    expect(screen.queryByTestId('state-loading')).toBeNull();
    expect(screen.queryByTestId('state-error')).toBeNull();
    expect(screen.queryByTestId('state-empty')).toBeNull();
  });
});
