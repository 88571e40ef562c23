/**
 * The local S3 fake (s3rver) the embedded server runs when no S3_URL is set: objects as files in
 * `<data>/objects`, on a loopback port of its own. Tests start one on a temporary folder.
 */
import { mkdirSync } from 'node:fs';
import S3rver from 's3rver';

export type FakeS3 = { url: string; port: number; stop: () => Promise<void> };

/** The fake's credentials: it accepts any key pair; these are s3rver's documented defaults. */
export const FAKE_CREDENTIALS = { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' };

/** Starts s3rver on 127.0.0.1 (port 0: any free port) with its objects in `directory`. */
export async function startFakeS3(directory: string, port = 0): Promise<FakeS3> {
  mkdirSync(directory, { recursive: true });
  const server = new S3rver({ port, address: '127.0.0.1', directory, silent: true });
  const info = (await server.run()) as { port: number };
  let stopped = false;
  return {
    url: `http://127.0.0.1:${info.port}`,
    port: info.port,
    stop: async () => {
      if (stopped) return;
      stopped = true;
      await server.close();
    },
  };
}
