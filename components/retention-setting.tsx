import { useState } from 'react';
import { TextInput, View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { FormError } from '@/components/form-error';
import { QueryState } from '@/components/query-state';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { useSetRetention } from '@/lib/api/originals';
import { useOrganisationSettings } from '@/lib/api/users';
import { readNumber } from '@/lib/schemas/numbers';

/** How many years the original files of a released batch are kept before an administrator may delete them. */
export function RetentionSetting() {
  const settings = useOrganisationSettings();
  const set = useSetRetention();
  const [text, setText] = useState<string | null>(null);
  return (
    <Card title="Keeping original files" testID="retention-setting">
      <QueryState query={settings}>
        {(s) => {
          const years = readNumber(text ?? String(s.retention_years)) ?? Number.NaN;
          return (
            <>
              <Txt variant="body">
                Original files of a released batch are kept {s.retention_years} years after its release; until then they cannot be deleted.
              </Txt>
              <View style={{ flexDirection: 'row', alignItems: 'center', gap: 8, flexWrap: 'wrap' }}>
                <TextInput
                  value={text ?? String(s.retention_years)}
                  onChangeText={setText}
                  inputMode="numeric"
                  accessibilityLabel="Years originals are kept"
                  style={{ borderWidth: 1, borderColor: theme.color.line, borderRadius: theme.radius.m, padding: 8, width: 80, fontFamily: theme.font.regular, color: theme.color.ink }}
                  testID="retention-years"
                />
                <Txt variant="body">years</Txt>
                <Button label="Save" kind="secondary" busy={set.isPending} disabled={!Number.isFinite(years) || years === s.retention_years} onPress={() => set.mutate(years, { onSuccess: () => setText(null) })} testID="save-retention" />
              </View>
              <FormError error={set.error} />
            </>
          );
        }}
      </QueryState>
    </Card>
  );
}
