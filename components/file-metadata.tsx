import { StyleSheet, View } from 'react-native';
import { Card } from '@/components/card';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { fmtParam } from '@/lib/format';
import type { CurveMeta } from '@/lib/iv/types';

/**
 * The lines of the file's header block the reader has no field for (`meta.extra`), as the file
 * wrote them, and the irradiance column's mean and change when the file had one. Nothing when
 * there is neither.
 */
export function FileMetadata({ meta }: { meta: CurveMeta }) {
  const extra = meta.extra ?? [];
  const spread = meta.irradiance_spread_pct;
  if (!extra.length && spread == null) return null;
  return (
    <Card title="File metadata" testID="file-metadata">
      {spread != null ? (
        <Txt variant="body" testID="irradiance-column">
          Irradiance column: mean {fmtParam('irradiance_w_m2', meta.irradiance_w_m2)}, changing by {fmtParam('irradiance_spread_pct', spread)} of the mean during the sweep.
        </Txt>
      ) : null}
      {extra.length ? (
        <View>
          {extra.map((e, k) => (
            <View key={k} style={styles.row}>
              <Txt variant="label" style={styles.key}>{e.key}</Txt>
              <Txt variant="body" style={styles.value}>{e.value}</Txt>
            </View>
          ))}
          <Txt variant="caption">As written in the file, before the table; not used in the figures.</Txt>
        </View>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', columnGap: 12, borderBottomWidth: 1, borderBottomColor: theme.color.sunken, paddingVertical: 4 },
  key: { width: 180, maxWidth: '100%' },
  value: { flexGrow: 1, flexShrink: 1, flexBasis: 200, minWidth: 0 },
});
