/**
 * Opening the raw-data archive: S3_URL, S3_BUCKET, S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY name a
 * real S3-compatible service; without S3_URL the server starts the local fake (s3rver) with its
 * objects in `<data>/objects` on a loopback port (S3_FAKE_PORT, default any free port).
 */
import path from 'node:path';
import { FAKE_CREDENTIALS, startFakeS3 } from '@/server/storage/fake-s3';
import type { FakeS3 } from '@/server/storage/fake-s3';
import { s3Store } from '@/server/storage/object-store';
import type { ObjectStore } from '@/server/storage/object-store';

export { ObjectMissingError, StorageUnavailableError } from '@/server/storage/object-store';
export type { ObjectStore, StoredObject } from '@/server/storage/object-store';

export const DEFAULT_BUCKET = 'quasilevel-originals';

/** Where an original file is kept: content-addressed within its organisation and batch. */
export function originalKey(organizationId: string, batchId: string, sha256: string): string {
  return `org/${organizationId}/batch/${batchId}/${sha256}`;
}

/** The key's parts, or null for a key the archive did not write. */
export function parseOriginalKey(key: string): { organizationId: string; batchId: string; sha256: string } | null {
  const m = /^org\/([^/]+)\/batch\/([^/]+)\/([0-9a-f]{64})$/.exec(key);
  return m ? { organizationId: m[1], batchId: m[2], sha256: m[3] } : null;
}

export type Storage = { store: ObjectStore; fake: FakeS3 | null; stop: () => Promise<void> };

/** Opens the archive the environment names (a real service, or the fake in `<dataDir>/objects`) and makes sure its bucket exists. */
export async function openStorage(dataDir: string, env: NodeJS.ProcessEnv = process.env): Promise<Storage> {
  const bucket = env.S3_BUCKET || DEFAULT_BUCKET;
  if (env.S3_URL) {
    if (!env.S3_ACCESS_KEY_ID || !env.S3_SECRET_ACCESS_KEY) throw new Error('S3_URL is set without S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY: set both (or unset S3_URL to use the local fake).');
    const store = s3Store({ url: env.S3_URL, bucket, accessKeyId: env.S3_ACCESS_KEY_ID, secretAccessKey: env.S3_SECRET_ACCESS_KEY, region: env.S3_REGION });
    await store.ensureBucket();
    return { store, fake: null, stop: async () => store.close() };
  }
  return openFakeStorage(path.join(dataDir, 'objects'), { bucket, port: Number(env.S3_FAKE_PORT || 0) });
}

/**
 * The local fake on `directory` with a client for it (the server without S3_URL, and the tests).
 * Its puts skip HTTP (the fake is in this process: fake-s3.ts) unless `sdk`.
 */
export async function openFakeStorage(directory: string, opts: { bucket?: string; port?: number; sdk?: boolean } = {}): Promise<Storage> {
  const fake = await startFakeS3(directory, opts.port ?? 0);
  const bucket = opts.bucket ?? DEFAULT_BUCKET;
  const sdk = s3Store({ url: fake.url, bucket, ...FAKE_CREDENTIALS });
  // Writes straight into the fake's folder (fake-s3.ts), the rest through the S3 API; `sdk: true` puts through the API as well.
  const store: ObjectStore = opts.sdk ? sdk : { ...sdk, put: (key, bytes) => fake.put(bucket, key, bytes) };
  try {
    await store.ensureBucket();
  } catch (err) {
    await fake.stop();
    throw err;
  }
  return {
    store,
    fake,
    stop: async () => {
      store.close();
      await fake.stop();
    },
  };
}
