import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { Platform, StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { FormError } from '@/components/form-error';
import { QueryState } from '@/components/query-state';
import { TextField } from '@/components/text-field';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { useCreateStation, useRevokeStation, useStations } from '@/lib/api/stations';
import type { Station, StationCreated } from '@/lib/api/stations';
import { stationCreateSchema } from '@/lib/schemas/stations';

type Form = { name: string };

const when = (iso: string) => new Date(iso).toLocaleString();
/** A key has no spaces: on the web let it wrap anywhere instead of running off a phone's screen. */
const BREAK_ANYWHERE = (Platform.OS === 'web' ? { wordBreak: 'break-all' } : {}) as object;

/** The key of a station just made: shown this once, with a copy button and the watcher's command line. */
function NewKey({ made, onDone }: { made: StationCreated; onDone: () => void }) {
  const [copied, setCopied] = useState(false);
  const copy = async () => {
    if (Platform.OS === 'web' && typeof navigator !== 'undefined' && navigator.clipboard) {
      await navigator.clipboard.writeText(made.key);
      setCopied(true);
    }
  };
  const origin = typeof window !== 'undefined' && window.location ? window.location.origin : 'http://127.0.0.1:8080';
  return (
    <View style={styles.newKey} testID="station-new-key" accessibilityRole="alert">
      <Txt variant="label">Key of “{made.name}”: copy it now</Txt>
      <Txt variant="caption">It is shown only this once; Quasilevel keeps only a hash of it. Lost keys are revoked and replaced.</Txt>
      <Txt variant="figure" selectable style={[styles.key, BREAK_ANYWHERE]} testID="station-key-text">
        {made.key}
      </Txt>
      <Txt variant="caption">On the test station, send the tester’s folder with:</Txt>
      <Txt variant="figure" selectable style={[styles.key, BREAK_ANYWHERE]}>
        {`npm run --silent cli -- watch <folder> --server ${origin} --key <the key> --lot <lot name>`}
      </Txt>
      <View style={styles.buttons}>
        <Button label={copied ? 'Copied' : 'Copy key'} onPress={copy} testID="station-copy-key" />
        <Button label="Done, hide the key" kind="secondary" onPress={onDone} testID="station-key-done" />
      </View>
    </View>
  );
}

function StationRow({ s }: { s: Station }) {
  const revoke = useRevokeStation();
  const [asking, setAsking] = useState(false);
  return (
    <View style={styles.row} testID={`station-${s.name}`}>
      <View style={{ flex: 1, minWidth: 0 }}>
        <Txt variant="body" numberOfLines={1}>
          {s.name}
          {s.revoked ? ' · revoked' : ''}
        </Txt>
        <Txt variant="caption">
          Made {when(s.created_at)} · {s.last_used_at ? `last used ${when(s.last_used_at)}` : 'never used'}
          {s.key_start ? ` · key begins ${s.key_start}…` : ''}
        </Txt>
        {asking ? (
          <View style={styles.buttons}>
            <Txt variant="body">Revoke the key of {s.name}? The station’s uploads stop at once; what it sent stays.</Txt>
            <Button label="Revoke" kind="danger" onPress={() => revoke.mutate(s.id, { onSuccess: () => setAsking(false) })} busy={revoke.isPending} testID={`station-revoke-yes-${s.name}`} />
            <Button label="Cancel" kind="secondary" onPress={() => setAsking(false)} disabled={revoke.isPending} />
          </View>
        ) : null}
        <FormError error={revoke.error} />
      </View>
      {!s.revoked && !asking ? <Button label="Revoke" kind="quiet" onPress={() => setAsking(true)} testID={`station-revoke-${s.name}`} /> : null}
    </View>
  );
}

/** Test stations: make a key per station (shown once), see each one's last use, revoke. */
export function StationsPanel() {
  const stations = useStations();
  const create = useCreateStation();
  const [made, setMade] = useState<StationCreated | null>(null);
  const { control, handleSubmit, reset } = useForm<Form>({ resolver: zodResolver(stationCreateSchema), defaultValues: { name: '' } });
  const submit = handleSubmit((v) =>
    create.mutate(v.name, {
      onSuccess: (answer) => {
        setMade(answer);
        reset({ name: '' });
      },
    }),
  );
  return (
    <View style={{ gap: 16 }}>
      <Card title="New station key" testID="station-create">
        <Txt variant="caption">A key lets one test station create batches and upload curves in this organisation, and nothing else. Name it after the station.</Txt>
        <TextField control={control} name="name" label="Station name" autoComplete="off" testID="station-name" />
        <FormError error={create.error} />
        <Button label="Make key" onPress={submit} busy={create.isPending} testID="station-submit" />
        {made ? <NewKey made={made} onDone={() => setMade(null)} /> : null}
      </Card>
      <Card title="Stations">
        <QueryState query={stations} isEmpty={(d) => d.stations.length === 0} empty={<Txt variant="caption">No station keys yet.</Txt>}>
          {(d) => (
            <View>
              {d.stations.map((s) => (
                <StationRow key={s.id} s={s} />
              ))}
            </View>
          )}
        </QueryState>
      </Card>
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', alignItems: 'flex-start', gap: 8, paddingVertical: 10, borderTopWidth: 1, borderTopColor: theme.color.sunken },
  buttons: { flexDirection: 'row', flexWrap: 'wrap', gap: 8, alignItems: 'center', marginTop: 6 },
  newKey: { gap: 6, padding: 12, borderRadius: 8, backgroundColor: theme.color.holeSoft, borderWidth: 1, borderColor: theme.color.hole },
  key: { padding: 8, fontSize: 12, lineHeight: 17, backgroundColor: theme.color.surface, borderRadius: 6, flexShrink: 1 },
});
