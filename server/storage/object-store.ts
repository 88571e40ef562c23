/**
 * The raw-data archive's object storage, through the S3 SDK (@aws-sdk/client-s3): a real
 * S3-compatible service when S3_URL is set, else the local fake (server/storage/fake-s3.ts).
 * Path-style addressing, region us-east-1, and checksums only when an operation requires one
 * (`WHEN_REQUIRED`): the SDK's newer default streaming checksums are not known to every
 * S3-compatible service, the fake included (docs/stack.md, "Object storage").
 */
import { CreateBucketCommand, DeleteObjectCommand, GetObjectCommand, HeadBucketCommand, ListObjectsV2Command, PutObjectCommand, S3Client } from '@aws-sdk/client-s3';

/** Object storage could not be reached or answered with a server error: the request is 503. */
export class StorageUnavailableError extends Error {}
/** The key is not in the bucket. */
export class ObjectMissingError extends Error {}

export type StoredObject = { key: string; size: number; modified: Date };

export type ObjectStore = {
  /** Where the objects are, for log lines: the endpoint and bucket. */
  readonly where: string;
  /** Creates the bucket when it is missing. */
  ensureBucket(): Promise<void>;
  put(key: string, bytes: Uint8Array, contentType: string): Promise<void>;
  get(key: string): Promise<Buffer>;
  /** Removes the keys (a missing key is no error). */
  remove(keys: string[]): Promise<void>;
  /** Every object under the prefix. */
  list(prefix: string): Promise<StoredObject[]>;
  /** Answers when storage is reachable; throws StorageUnavailableError when not. */
  ping(): Promise<void>;
  close(): void;
};

export type S3Settings = { url: string; bucket: string; accessKeyId: string; secretAccessKey: string; region?: string };

type SdkError = { name?: string; code?: string; $metadata?: { httpStatusCode?: number }; message?: string };

/**
 * A storage failure in a person's words: a missing key (or bucket, when `missing` says a 404 means
 * that) is ObjectMissingError; anything else — refused connection, timeout, server error, a bucket
 * gone while writing, refused credentials — is StorageUnavailableError, a 503 for the request.
 */
function translate(err: unknown, what: string, missing = false): Error {
  const e = (err ?? {}) as SdkError;
  const status = e.$metadata?.httpStatusCode;
  if (missing && (e.name === 'NoSuchKey' || e.name === 'NotFound' || status === 404)) return new ObjectMissingError(`${what}: the object is not in storage.`);
  return new StorageUnavailableError(`Object storage is not available (${e.code ?? e.name ?? 'error'}${status ? ` ${status}` : ''}): ${what} could not be done. Try again when it is back.`);
}

export function s3Store(s: S3Settings): ObjectStore {
  // The SDK warns on Node 20 that releases after January 2027 will need Node 22; the lock file pins
  // the release this product was tested with, so the notice is for whoever upgrades it, not for
  // every server start. An operator who sets the variable keeps their choice.
  process.env.AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED ??= 'true';
  const client = new S3Client({
    endpoint: s.url,
    region: s.region ?? 'us-east-1',
    forcePathStyle: true,
    credentials: { accessKeyId: s.accessKeyId, secretAccessKey: s.secretAccessKey },
    requestChecksumCalculation: 'WHEN_REQUIRED',
    responseChecksumValidation: 'WHEN_REQUIRED',
    // A storage that is down answers the upload or download quickly with 503, not after minutes.
    maxAttempts: 2,
    requestHandler: { connectionTimeout: 3000, requestTimeout: 60_000 },
  });
  const Bucket = s.bucket;
  const call = async <T>(what: string, f: () => Promise<T>, missing = false): Promise<T> => {
    try {
      return await f();
    } catch (err) {
      throw translate(err, what, missing);
    }
  };
  return {
    where: `${s.url.replace(/\/$/, '')}/${Bucket}`,
    async ensureBucket() {
      try {
        await client.send(new HeadBucketCommand({ Bucket }));
      } catch (err) {
        const e = translate(err, 'opening the bucket', true);
        if (!(e instanceof ObjectMissingError)) throw e;
        await call('creating the bucket', () => client.send(new CreateBucketCommand({ Bucket })));
      }
    },
    async put(key, bytes, contentType) {
      await call('storing the original file', () => client.send(new PutObjectCommand({ Bucket, Key: key, Body: bytes, ContentType: contentType, ContentLength: bytes.byteLength })));
    },
    async get(key) {
      return call('reading the original file', async () => {
        const out = await client.send(new GetObjectCommand({ Bucket, Key: key }));
        return Buffer.from(await out.Body!.transformToByteArray());
      }, true);
    },
    async remove(keys) {
      // One request a key: the batch delete needs a Content-MD5 or checksum header that not every service accepts.
      for (const Key of keys) await call('deleting an original file', () => client.send(new DeleteObjectCommand({ Bucket, Key })));
    },
    async list(prefix) {
      const out: StoredObject[] = [];
      let token: string | undefined;
      do {
        const page = await call('listing the archive', () => client.send(new ListObjectsV2Command({ Bucket, Prefix: prefix, ContinuationToken: token })));
        for (const o of page.Contents ?? []) if (o.Key) out.push({ key: o.Key, size: o.Size ?? 0, modified: o.LastModified ?? new Date(0) });
        token = page.IsTruncated ? page.NextContinuationToken : undefined;
      } while (token);
      return out;
    },
    async ping() {
      await call('reaching object storage', () => client.send(new HeadBucketCommand({ Bucket })));
    },
    close() {
      client.destroy();
    },
  };
}
