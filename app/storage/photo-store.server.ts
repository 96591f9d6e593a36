/**
 * The photo store: objects in an S3-compatible bucket through @aws-sdk/client-s3. Keys are
 * `photos/<rigId>/<photoId>/original.<ext>` and `photos/<rigId>/<photoId>/thumb.webp`, so the
 * orphan sweep can tell which row an object belongs to from its key alone.
 */
import {
  DeleteObjectsCommand,
  GetObjectCommand,
  ListObjectsV2Command,
  NoSuchKey,
  PutObjectCommand,
  S3Client,
  S3ServiceException,
} from "@aws-sdk/client-s3";
import { getEnv, type PhotoStorageSettings } from "~/env.server";

export const PHOTO_PREFIX = "photos/";

export type StoredObject = { key: string; lastModified: Date; size: number };
export type ObjectBody = { stream: ReadableStream<Uint8Array>; contentType: string; length: number | null };

export interface PhotoStore {
  readonly bucket: string;
  put(key: string, body: Uint8Array, contentType: string): Promise<void>;
  /** The object, or null when there is none. */
  get(key: string): Promise<ObjectBody | null>;
  /** Deletes the keys (missing keys are no error). */
  delete(keys: string[]): Promise<void>;
  /** Every object under the prefix. */
  list(prefix?: string): AsyncIterable<StoredObject>;
}

export function photoKeys(rigId: string, photoId: string, ext: string) {
  const base = `${PHOTO_PREFIX}${rigId}/${photoId}/`;
  return { original: `${base}original.${ext}`, thumb: `${base}thumb.webp` };
}

/** The photo id a key belongs to, or null for a key outside the photo layout. */
export function photoIdOfKey(key: string): string | null {
  const match = /^photos\/[0-9a-f-]{36}\/([0-9a-f-]{36})\/[^/]+$/.exec(key);
  return match ? match[1]! : null;
}

export function createS3PhotoStore(settings: PhotoStorageSettings): PhotoStore {
  // The pinned SDK runs on Node.js 20 (README); its notice about later releases is not for users.
  process.env.AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED ??= "true";
  const client = new S3Client({
    region: settings.region,
    endpoint: settings.endpoint,
    forcePathStyle: settings.forcePathStyle,
    credentials: settings.credentials,
    // S3-compatible stores (and the local fake) do not all know the SDK's newer default checksums.
    requestChecksumCalculation: "WHEN_REQUIRED",
    responseChecksumValidation: "WHEN_REQUIRED",
    maxAttempts: 3,
  });
  const Bucket = settings.bucket;
  return {
    bucket: Bucket,
    async put(key, body, contentType) {
      await client.send(new PutObjectCommand({ Bucket, Key: key, Body: body, ContentType: contentType, ContentLength: body.byteLength }));
    },
    async get(key) {
      try {
        const answer = await client.send(new GetObjectCommand({ Bucket, Key: key }));
        if (!answer.Body) return null;
        return {
          stream: answer.Body.transformToWebStream() as ReadableStream<Uint8Array>,
          contentType: answer.ContentType ?? "application/octet-stream",
          length: answer.ContentLength ?? null,
        };
      } catch (error) {
        if (error instanceof NoSuchKey || (error instanceof S3ServiceException && error.$metadata.httpStatusCode === 404)) return null;
        throw error;
      }
    },
    async delete(keys) {
      for (let i = 0; i < keys.length; i += 1000) {
        const chunk = keys.slice(i, i + 1000);
        if (!chunk.length) continue;
        const answer = await client.send(
          new DeleteObjectsCommand({ Bucket, Delete: { Objects: chunk.map((Key) => ({ Key })), Quiet: true } }),
        );
        const failed = (answer.Errors ?? []).filter((e) => e.Code !== "NoSuchKey");
        if (failed.length) throw new Error(`the photo store kept ${failed.length} object(s): ${failed[0]?.Code ?? "error"}`);
      }
    },
    async *list(prefix = PHOTO_PREFIX) {
      let token: string | undefined;
      do {
        const page = await client.send(new ListObjectsV2Command({ Bucket, Prefix: prefix, ContinuationToken: token }));
        for (const o of page.Contents ?? []) {
          if (o.Key) yield { key: o.Key, lastModified: o.LastModified ?? new Date(0), size: o.Size ?? 0 };
        }
        token = page.IsTruncated ? page.NextContinuationToken : undefined;
      } while (token);
    },
  };
}

let memo: PhotoStore | null | undefined;

/** The store from the environment, or null when photos are off on this server. */
export function getPhotoStore(): PhotoStore | null {
  if (memo === undefined) {
    const settings = getEnv().photos;
    memo = settings ? createS3PhotoStore(settings) : null;
  }
  return memo;
}
