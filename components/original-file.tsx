import { useState } from 'react';
import { View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { FormError } from '@/components/form-error';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import type { CurveDetail } from '@/lib/api/batches';
import { originalsZipUrl, originalUrl, useDeleteOriginals, useReanalyse, useVerifyOriginals } from '@/lib/api/originals';
import { downloadFromUrl } from '@/lib/download';
import type { OriginalsCheck } from '@/lib/schemas/responses';

/** Bytes in words: "1,234 bytes", "12.3 kB", "4.56 MB" (decimal prefixes). */
export function bytesInWords(n: number | null): string {
  if (n == null) return 'size not recorded';
  if (n < 10_000) return `${n.toLocaleString('en')} bytes`;
  if (n < 1e6) return `${(n / 1e3).toPrecision(3)} kB`;
  return `${(n / 1e6).toPrecision(3)} MB`;
}

/** The curve page's card on the file the curve was read from: download it, read it again with the current reader. */
export function CurveOriginal({ c, canWrite }: { c: CurveDetail; canWrite: boolean }) {
  const reanalyse = useReanalyse(c.id);
  const o = c.original;
  return (
    <Card title="Original file" testID="original-file">
      {!o ? (
        <Txt variant="body">This curve was stored without its file (demo data, or uploaded before originals were kept).</Txt>
      ) : (
        <>
          <Txt variant="body">
            {o.file_name} · {bytesInWords(o.file_size_bytes)}
            {o.kept ? '' : ` · deleted ${o.deleted_at ? new Date(o.deleted_at).toLocaleDateString() : ''} after its retention period`}
          </Txt>
          <Txt variant="caption" selectable style={{ fontFamily: theme.font.mono }} testID="original-sha256">
            SHA-256 {o.file_sha256}
          </Txt>
          {o.kept ? (
            <View style={{ flexDirection: 'row', gap: 8, flexWrap: 'wrap' }}>
              <Button label="Download original" kind="secondary" onPress={() => downloadFromUrl(originalUrl(c.id))} testID="download-original" />
              {canWrite ? (
                <Button label="Re-analyse from original" kind="secondary" busy={reanalyse.isPending} onPress={() => reanalyse.mutate()} testID="reanalyse" />
              ) : null}
            </View>
          ) : null}
          {canWrite && o.kept ? <Txt variant="caption">Re-analysing reads the file again with the current reader and fits; the earlier fits stay in the history below.</Txt> : null}
          <FormError error={reanalyse.error} />
        </>
      )}
    </Card>
  );
}

function CheckResult({ r }: { r: OriginalsCheck }) {
  if (r.ok) return <Txt variant="body" testID="originals-check">All {r.checked} kept original file(s) match the SHA-256 recorded at upload.</Txt>;
  return (
    <View style={{ gap: 4 }} testID="originals-check">
      <Txt variant="body" style={{ color: theme.color.danger }}>
        {r.problems.length} of {r.checked} original file(s) do not match what was uploaded:
      </Txt>
      {r.problems.map((p) => (
        <Txt key={`${p.file_name}-${p.expected_sha256}`} variant="caption">
          {p.file_name}: {p.problem === 'missing' ? 'not in storage' : p.problem === 'mismatch' ? 'its bytes changed' : 'differs from the hash on its curve'}
        </Txt>
      ))}
    </View>
  );
}

/** The batch page's card on its raw-data archive: the zip for everyone, the check and deletion for administrators. */
export function BatchOriginals({ batchId, canManage }: { batchId: string; canManage: boolean }) {
  const verify = useVerifyOriginals(batchId);
  const remove = useDeleteOriginals(batchId);
  const [confirming, setConfirming] = useState(false);
  return (
    <Card title="Original files" testID="batch-originals">
      <Txt variant="body">Every uploaded file is kept byte for byte, accepted or refused. The zip holds them with a manifest of names, SHA-256 hashes, devices and results.</Txt>
      <View style={{ flexDirection: 'row', gap: 8, flexWrap: 'wrap' }}>
        <Button label="Download originals (zip)" kind="secondary" onPress={() => downloadFromUrl(originalsZipUrl(batchId))} testID="download-originals" />
        {canManage ? <Button label="Check the archive" kind="secondary" busy={verify.isPending} onPress={() => verify.mutate()} testID="verify-originals" /> : null}
        {canManage && !confirming ? <Button label="Delete originals…" kind="quiet" onPress={() => setConfirming(true)} testID="delete-originals" /> : null}
      </View>
      {verify.data ? <CheckResult r={verify.data} /> : null}
      {confirming ? (
        <View style={{ gap: 8 }}>
          <Txt variant="body">Delete every kept original of this batch? The curves, their figures and the release records stay; the files cannot be downloaded again.</Txt>
          <View style={{ flexDirection: 'row', gap: 8, flexWrap: 'wrap' }}>
            <Button label="Delete the files" kind="danger" busy={remove.isPending} onPress={() => remove.mutate(undefined, { onSettled: () => setConfirming(false) })} testID="confirm-delete-originals" />
            <Button label="Cancel" kind="quiet" onPress={() => setConfirming(false)} />
          </View>
        </View>
      ) : null}
      {remove.data ? <Txt variant="body">{remove.data.deleted} original file(s) deleted.</Txt> : null}
      <FormError error={verify.error ?? remove.error} />
    </Card>
  );
}
