import { Switch, View } from 'react-native';
import { Card } from '@/components/card';
import { FormError } from '@/components/form-error';
import { QueryState } from '@/components/query-state';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { useOrganisationSettings, useSetJoinByDomain } from '@/lib/api/users';

/** The organisation's setting: may verified addresses of its domain join without approval? */
export function JoinSetting() {
  const settings = useOrganisationSettings();
  const set = useSetJoinByDomain();
  return (
    <Card title="Joining by e-mail domain" testID="join-setting">
      <QueryState query={settings}>
        {(s) => (
          <>
            <View style={{ flexDirection: 'row', alignItems: 'center', gap: 12 }}>
              <Switch
                value={s.join_by_domain}
                onValueChange={(on) => set.mutate(on)}
                disabled={set.isPending}
                trackColor={{ true: theme.color.electron, false: theme.color.line }}
                accessibilityLabel={`Let confirmed @${s.domain} addresses join without approval`}
                testID="join-by-domain"
              />
              <Txt variant="body" style={{ flex: 1 }}>
                {s.join_by_domain
                  ? `On: anyone who confirms an @${s.domain} address joins at once as test engineer.`
                  : `Off: people with a confirmed @${s.domain} address ask to join, and an administrator decides.`}
              </Txt>
            </View>
            <FormError error={set.error} />
          </>
        )}
      </QueryState>
    </Card>
  );
}
