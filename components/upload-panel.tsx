import { zodResolver } from '@hookform/resolvers/zod';
import * as DocumentPicker from 'expo-document-picker';
import { Link } from 'expo-router';
import { useEffect, useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { Platform, StyleSheet, View, useWindowDimensions } from 'react-native';
import type { z } from 'zod';
import { Button } from '@/components/button';
import { FormError } from '@/components/form-error';
import { TextField } from '@/components/text-field';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { uploadFiles, useAfterUpload } from '@/lib/api/batches';
import type { UploadFileResult, UploadOptions } from '@/lib/api/batches';
import { uploadOverridesSchema } from '@/lib/schemas/curves';
import { labelWithUnit } from '@/lib/vocabulary';

type Picked = { name: string; blob: Blob };
type OverrideForm = z.input<typeof uploadOverridesSchema>;

/**
 * Upload for a batch: pick files (or drop them on the panel on a wide screen), optional
 * overrides for every file, a progress bar while files are sent and fitted, and each file's
 * result afterwards. Devices already in the batch are held back until the user says replace or keep both.
 */
export function UploadPanel({ batchId }: { batchId: string }) {
  const [files, setFiles] = useState<Picked[]>([]);
  const [progress, setProgress] = useState<{ done: number; total: number; phase: string } | null>(null);
  const [results, setResults] = useState<UploadFileResult[] | null>(null);
  const [error, setError] = useState<unknown>(null);
  const [dragOver, setDragOver] = useState(false);
  const [lastOptions, setLastOptions] = useState<UploadOptions>({});
  const dropRef = useRef<View>(null);
  const afterUpload = useAfterUpload(batchId);
  const { width } = useWindowDimensions();
  const { control, handleSubmit } = useForm<OverrideForm>({
    resolver: zodResolver(uploadOverridesSchema),
    defaultValues: { temp_c: '', irradiance_w_m2: '', cells: '', area_cm2: '' },
  });

  useEffect(() => {
    if (Platform.OS !== 'web') return;
    const node = dropRef.current as unknown as HTMLElement | null;
    if (!node || typeof node.addEventListener !== 'function') return;
    const over = (e: DragEvent) => {
      e.preventDefault();
      setDragOver(true);
    };
    const leave = () => setDragOver(false);
    const drop = (e: DragEvent) => {
      e.preventDefault();
      setDragOver(false);
      const list = Array.from(e.dataTransfer?.files ?? []);
      if (list.length) setFiles((prev) => [...prev, ...list.map((f) => ({ name: f.name, blob: f }))]);
    };
    node.addEventListener('dragover', over);
    node.addEventListener('dragleave', leave);
    node.addEventListener('drop', drop);
    return () => {
      node.removeEventListener('dragover', over);
      node.removeEventListener('dragleave', leave);
      node.removeEventListener('drop', drop);
    };
  }, []);

  const pick = async () => {
    const res = await DocumentPicker.getDocumentAsync({ multiple: true, copyToCacheDirectory: false, type: ['text/*', 'application/vnd.ms-excel', '*/*'] });
    if (res.canceled) return;
    const picked: Picked[] = [];
    for (const a of res.assets) {
      const blob = a.file ?? (await (await fetch(a.uri)).blob());
      picked.push({ name: a.name, blob });
    }
    setFiles((prev) => [...prev, ...picked]);
    setResults(null);
  };

  const send = async (list: Picked[], options: UploadOptions) => {
    setError(null);
    setProgress({ done: 0, total: list.length, phase: 'sending' });
    try {
      const r = await uploadFiles(batchId, list, options, (done, total, phase) => setProgress({ done, total, phase }));
      setResults((prev) => {
        if (!prev || options.on_duplicate === 'ask') return r;
        // A second pass answers the held-back duplicates: merge by file name.
        const byName = new Map(r.map((x) => [x.file, x]));
        return prev.map((x) => byName.get(x.file) ?? x);
      });
      if (options.on_duplicate === 'ask' || !options.on_duplicate) setFiles(list.filter((f) => r.some((x) => !x.accepted && x.code === 'duplicate' && x.file === f.name)));
      else setFiles([]);
      await afterUpload();
    } catch (err) {
      setError(err);
    } finally {
      setProgress(null);
    }
  };

  const start = handleSubmit((v) => {
    const options: UploadOptions = {
      temp_c: v.temp_c == null ? undefined : String(v.temp_c),
      irradiance_w_m2: v.irradiance_w_m2 == null ? undefined : String(v.irradiance_w_m2),
      cells: v.cells == null ? undefined : String(v.cells),
      area_cm2: v.area_cm2 == null ? undefined : String(v.area_cm2),
      on_duplicate: 'ask',
    };
    setLastOptions(options);
    setResults(null);
    void send(files, options);
  });

  const duplicates = results?.filter((r) => !r.accepted && r.code === 'duplicate') ?? [];
  const accepted = results?.filter((r) => r.accepted).length ?? 0;
  const rejected = results?.filter((r) => !r.accepted && r.code !== 'duplicate') ?? [];
  const busy = !!progress;
  const wide = width >= theme.wideFrom;

  return (
    <View style={{ gap: 12 }} testID="upload-panel">
      <View ref={dropRef} style={[styles.drop, dragOver && styles.dropActive]}>
        <Txt variant="body" style={{ textAlign: 'center' }}>
          {files.length ? `${files.length} file${files.length === 1 ? '' : 's'} ready` : wide ? 'Drop I-V files here, or pick them.' : 'Pick I-V files from this device.'}
        </Txt>
        <Txt variant="caption" style={{ textAlign: 'center' }}>
          CSV, TSV or semicolon text with a voltage and a current column (V/mV, A/mA); up to 10 MB each. Metadata lines such as “# cell temperature: 25” are read.
        </Txt>
        <View style={{ flexDirection: 'row', gap: 8, flexWrap: 'wrap', justifyContent: 'center' }}>
          <Button label="Pick files" kind="secondary" onPress={pick} disabled={busy} testID="pick-files" />
          {files.length ? <Button label="Clear" kind="quiet" onPress={() => setFiles([])} disabled={busy} /> : null}
        </View>
      </View>

      <Txt variant="label">Override for every file (optional)</Txt>
      <View style={styles.fields}>
        <View style={styles.field}><TextField control={control} name="temp_c" label={labelWithUnit('temp_c')} keyboardType="numbers-and-punctuation" autoCapitalize="none" placeholder="from file" /></View>
        <View style={styles.field}><TextField control={control} name="irradiance_w_m2" label={labelWithUnit('irradiance_w_m2')} keyboardType="numbers-and-punctuation" autoCapitalize="none" placeholder="from file" /></View>
        <View style={styles.field}><TextField control={control} name="cells" label={labelWithUnit('cells')} keyboardType="numeric" placeholder="batch default" /></View>
        <View style={styles.field}><TextField control={control} name="area_cm2" label={labelWithUnit('area_cm2')} keyboardType="numbers-and-punctuation" autoCapitalize="none" placeholder="batch default" /></View>
      </View>

      <Button label={busy ? 'Uploading…' : `Upload and fit ${files.length || ''}`.trim()} onPress={start} disabled={!files.length || busy || duplicates.length > 0} busy={busy} testID="start-upload" />

      {progress ? (
        <View style={{ gap: 4 }} testID="upload-progress" accessibilityRole="progressbar" accessibilityValue={{ min: 0, max: progress.total, now: Math.round(progress.done) }}>
          <View style={styles.barTrack}>
            <View style={[styles.barFill, { width: `${Math.max(2, (100 * progress.done) / Math.max(1, progress.total))}%` }]} />
          </View>
          <Txt variant="caption">
            {progress.phase === 'sending' ? 'Sending' : 'Fitting'} — {Math.floor(progress.done)} of {progress.total} files
          </Txt>
        </View>
      ) : null}

      <FormError error={error} />

      {results ? (
        <View style={styles.results} testID="upload-results">
          <Txt variant="heading">
            {accepted} accepted · {rejected.length} rejected{duplicates.length ? ` · ${duplicates.length} already in the batch` : ''}
          </Txt>
          {duplicates.length ? (
            <View style={styles.ask} testID="duplicate-question">
              <Txt variant="body">
                {duplicates.length === 1 ? `Device ${duplicates[0].device_id} is` : `${duplicates.length} devices are`} already in this batch. Replace the stored curve{duplicates.length === 1 ? '' : 's'}, or keep both?
              </Txt>
              <View style={{ flexDirection: 'row', gap: 8, flexWrap: 'wrap' }}>
                <Button label="Replace" onPress={() => void send(files, { ...lastOptions, on_duplicate: 'replace' })} disabled={busy} testID="dup-replace" />
                <Button label="Keep both" kind="secondary" onPress={() => void send(files, { ...lastOptions, on_duplicate: 'keep' })} disabled={busy} testID="dup-keep" />
                <Button label="Skip them" kind="quiet" onPress={() => { setResults((r) => r?.filter((x) => x.accepted || x.code !== 'duplicate') ?? null); setFiles([]); }} disabled={busy} />
              </View>
            </View>
          ) : null}
          {results.map((r) => (
            <View key={r.file + (r.accepted ? r.curve_id : r.code)} style={styles.resultRow}>
              <Txt variant="figure" style={{ color: r.accepted ? theme.color.ok : r.code === 'duplicate' ? theme.color.hole : theme.color.danger, fontSize: 13 }}>
                {r.accepted ? '✓' : r.code === 'duplicate' ? '?' : '✕'}
              </Txt>
              <View style={{ flex: 1, minWidth: 0 }}>
                {r.accepted ? (
                  <Link href={`/curves/${r.curve_id}`}>
                    <Txt variant="body" style={{ color: theme.color.electron }}>{r.file} → {r.device_id}{r.replaced ? ' (replaced)' : ''}</Txt>
                  </Link>
                ) : (
                  <>
                    <Txt variant="body">{r.file}</Txt>
                    <Txt variant="caption" style={{ color: theme.color.danger }}>{r.error}</Txt>
                  </>
                )}
              </View>
            </View>
          ))}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  drop: {
    borderWidth: 2,
    borderStyle: 'dashed',
    borderColor: theme.color.line,
    borderRadius: theme.radius.l,
    padding: 18,
    gap: 8,
    alignItems: 'center',
    backgroundColor: theme.color.paper,
  },
  dropActive: { borderColor: theme.color.electron, backgroundColor: theme.color.electronSoft },
  fields: { flexDirection: 'row', flexWrap: 'wrap', gap: 10 },
  field: { flexGrow: 1, flexBasis: 150, minWidth: 140 },
  barTrack: { height: 10, borderRadius: 5, backgroundColor: theme.color.sunken, overflow: 'hidden' },
  barFill: { height: 10, backgroundColor: theme.color.electron },
  results: { gap: 8 },
  ask: { backgroundColor: theme.color.holeSoft, borderRadius: theme.radius.m, padding: 12, gap: 10 },
  resultRow: { flexDirection: 'row', gap: 10, alignItems: 'flex-start' },
});
