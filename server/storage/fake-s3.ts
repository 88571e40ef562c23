/**
 * The local S3 fake (s3rver) the embedded server runs when no S3_URL is set: objects as files in
 * `<data>/objects`, on a loopback port of its own. Tests start one on a temporary folder.
 *
 * `put` writes an object where s3rver's own PUT does (its store's object path) but without the
 * HTTP request: the fake lives in this process, and a request through the S3 SDK, the loopback
 * socket and s3rver's Koa stack cost ~2.5 ms of this process's main thread an object (measured:
 * 1,000 originals of an upload), about as much as storing their curves. It writes the bytes
 * only: s3rver makes an object's MD5 file itself when the object is first read, and keeps no
 * metadata file for an object without metadata (the type an original is served with is in its
 * `original_file` row), so an original costs one file instead of three. Reads, lists and deletes
 * still go through the S3 API (server/storage/object-store.ts).
 */
import { mkdirSync } from 'node:fs';
import { mkdir, writeFile } from 'node:fs/promises';
import path from 'node:path';
import S3rver from 's3rver';
import { StorageUnavailableError } from '@/server/storage/object-store';

export type FakeS3 = {
  url: string;
  port: number;
  /** Writes an object straight into the fake's folder (StorageUnavailableError once stopped). */
  put: (bucket: string, key: string, bytes: Uint8Array) => Promise<void>;
  stop: () => Promise<void>;
};

/** The fake's credentials: it accepts any key pair; these are s3rver's documented defaults. */
export const FAKE_CREDENTIALS = { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' };

/** The part of s3rver's filesystem store (lib/stores/filesystem.js, s3rver 3.7) the direct put uses. */
type FilesystemStore = {
  getResourcePath(bucket: string, key: string, resource: string): string;
};

/** Starts s3rver on 127.0.0.1 (port 0: any free port) with its objects in `directory`. */
export async function startFakeS3(directory: string, port = 0): Promise<FakeS3> {
  mkdirSync(directory, { recursive: true });
  const server = new S3rver({ port, address: '127.0.0.1', directory, silent: true });
  const info = (await server.run()) as { port: number };
  const store = (server as unknown as { store: FilesystemStore }).store;
  let stopped = false;
  return {
    url: `http://127.0.0.1:${info.port}`,
    port: info.port,
    put: async (bucket, key, bytes) => {
      if (stopped) throw new StorageUnavailableError('Object storage is not available (the local store is stopped): storing the original file could not be done. Try again when it is back.');
      try {
        const objectPath = store.getResourcePath(bucket, key, 'object');
        // The folder first only when missing (an upload's objects share one; s3rver removes emptied folders).
        await writeFile(objectPath, bytes).catch(async (err: NodeJS.ErrnoException) => {
          if (err.code !== 'ENOENT') throw err;
          await mkdir(path.dirname(objectPath), { recursive: true });
          await writeFile(objectPath, bytes);
        });
      } catch (err) {
        throw new StorageUnavailableError(`Object storage is not available (${(err as NodeJS.ErrnoException).code ?? 'error'}): storing the original file could not be done. Try again when it is back.`);
      }
    },
    stop: async () => {
      if (stopped) return;
      stopped = true;
      await server.close();
    },
  };
}
