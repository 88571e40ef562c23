import { ActivityIndicator, StyleSheet, View } from 'react-native';
import type { ReactNode } from 'react';
import { Button } from '@/components/button';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { toUserMessage } from '@/lib/api/client';

type QueryLike<T> = { isPending: boolean; isError: boolean; error: unknown; data: T | undefined; refetch: () => unknown };

/**
 * Renders a query's loading, error and empty states, and `children(data)` when there is data.
 * Every screen goes through this so the three states look and read the same everywhere.
 */
export function QueryState<T>({
  query,
  isEmpty,
  empty,
  children,
}: {
  query: QueryLike<T>;
  isEmpty?: (data: T) => boolean;
  empty?: ReactNode;
  children: (data: T) => ReactNode;
}) {
  if (query.isPending) {
    return (
      <View style={styles.center} testID="state-loading">
        <ActivityIndicator color={theme.color.electron} />
        <Txt variant="caption">Loading…</Txt>
      </View>
    );
  }
  if (query.isError || query.data === undefined) {
    return (
      <View style={[styles.box, styles.error]} testID="state-error" accessibilityRole="alert">
        <Txt variant="body">{toUserMessage(query.error)}</Txt>
        <Button label="Try again" kind="secondary" onPress={() => query.refetch()} />
      </View>
    );
  }
  if (isEmpty?.(query.data)) {
    return (
      <View style={[styles.box, styles.empty]} testID="state-empty">
        {typeof empty === 'string' || !empty ? <Txt variant="body">{empty ?? 'Nothing here yet.'}</Txt> : empty}
      </View>
    );
  }
  return <>{children(query.data)}</>;
}

const styles = StyleSheet.create({
  center: { padding: 24, alignItems: 'center', gap: 8 },
  box: { padding: 16, borderRadius: theme.radius.m, gap: 12, borderWidth: 1 },
  error: { backgroundColor: theme.color.dangerSoft, borderColor: theme.color.danger },
  empty: { backgroundColor: theme.color.sunken, borderColor: theme.color.line },
});
