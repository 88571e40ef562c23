import { StyleSheet, View } from 'react-native';
import { Card } from '@/components/card';
import { QueryState } from '@/components/query-state';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { describeAudit } from '@/lib/auth/audit';
import { useAudit } from '@/lib/api/users';
import { formatDateTime } from '@/lib/format';

/** The record of membership changes: who did what, and when (newest first). */
export function AuditList() {
  const audit = useAudit();
  return (
    <Card title="Record of changes" testID="audit-list">
      <QueryState query={audit} isEmpty={(d) => d.entries.length === 0} empty={<Txt variant="caption">No changes yet.</Txt>}>
        {(d) =>
          d.entries.map((e) => (
            <View key={e.id} style={styles.row} testID={`audit-${e.action}`}>
              <Txt variant="body">{describeAudit(e)}</Txt>
              <Txt variant="caption">{formatDateTime(e.created_at)}</Txt>
            </View>
          ))
        }
      </QueryState>
    </Card>
  );
}

const styles = StyleSheet.create({
  row: { gap: 2, paddingVertical: 8, borderBottomWidth: 1, borderBottomColor: theme.color.sunken },
});
