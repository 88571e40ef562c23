import { View } from 'react-native';
import { Card } from '@/components/card';
import { QueryState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { Txt } from '@/components/txt';
import { useOutbox } from '@/lib/api/outbox';
import { formatDateTime } from '@/lib/format';

export default function OutboxScreen() {
  const outbox = useOutbox();
  return (
    <Screen title="Outbox" subtitle="Messages Quasilevel sent for your organisation: review requests, release decisions, password resets." testID="outbox-screen">
      <QueryState query={outbox} isEmpty={(d) => d.messages.length === 0} empty="No messages sent yet.">
        {(d) => (
          <View style={{ gap: 10 }}>
            {d.messages.map((m) => (
              <Card key={m.id} title={m.subject}>
                <Txt variant="caption">
                  To {m.to} · {formatDateTime(m.created_at)} · {m.transport === 'file' ? 'written to the local outbox' : 'sent by SMTP'}
                </Txt>
                <Txt variant="body" numberOfLines={8}>{m.body}</Txt>
              </Card>
            ))}
          </View>
        )}
      </QueryState>
    </Screen>
  );
}
