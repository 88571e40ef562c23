import { Switch, View } from 'react-native';
import { Card } from '@/components/card';
import { FormError } from '@/components/form-error';
import { QueryState } from '@/components/query-state';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { useOrganisationSettings, useSetSeparateRelease } from '@/lib/api/users';

/**
 * The organisation's separation of duties at release: on (the default), whoever uploaded curves
 * to a batch or submitted it may not release it. A lab with one QA lead may need it off.
 */
export function ReleaseDutiesSetting() {
  const settings = useOrganisationSettings();
  const set = useSetSeparateRelease();
  return (
    <Card title="Separation of duties at release" testID="release-duties-setting">
      <QueryState query={settings}>
        {(s) => (
          <>
            <View style={{ flexDirection: 'row', alignItems: 'center', gap: 12 }}>
              <Switch
                value={s.separate_release}
                onValueChange={(on) => set.mutate(on)}
                disabled={set.isPending}
                trackColor={{ true: theme.color.electron, false: theme.color.line }}
                accessibilityLabel="Keep whoever uploaded or submitted a batch from releasing it"
                testID="separate-release"
              />
              <Txt variant="body" style={{ flex: 1 }}>
                {s.separate_release
                  ? 'On: a batch is released by a QA lead who neither uploaded its curves nor submitted it.'
                  : 'Off: the QA lead who uploaded or submitted a batch may release it too. Every release still records who signed it.'}
              </Txt>
            </View>
            <FormError error={set.error} />
          </>
        )}
      </QueryState>
    </Card>
  );
}
