// Recordings and photos in S3-compatible object storage, behind the same BlobStore interface as
// the data directory.
import { Readable } from "node:stream";
import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadObjectCommand,
  S3Client,
  type S3ClientConfig,
} from "@aws-sdk/client-s3";
import { Upload } from "@aws-sdk/lib-storage";
import { assertSafeKey, TooLargeError, type BlobStore, type StoredObject } from "./index";

export interface S3StoreOptions {
  bucket: string;
  region: string;
  /** An S3-compatible service's URL; when set, buckets are addressed by path, as such services expect. */
  endpoint?: string;
  credentials?: { accessKeyId: string; secretAccessKey: string };
  /** Prepended to every key, so that one bucket can serve several installations. */
  prefix?: string;
}

/** True for the SDK's "no such object" answers (GetObject says NoSuchKey, HeadObject a bare 404). */
function isMissing(err: unknown): boolean {
  const e = err as { name?: string; $metadata?: { httpStatusCode?: number } };
  return e?.name === "NoSuchKey" || e?.name === "NotFound" || e?.$metadata?.httpStatusCode === 404;
}

export class S3Store implements BlobStore {
  private readonly client: S3Client;

  constructor(private readonly options: S3StoreOptions) {
    const config: S3ClientConfig = {
      region: options.region,
      // Checksums only where S3 demands them: several S3-compatible services reject the
      // newer default trailing checksums on streamed uploads.
      requestChecksumCalculation: "WHEN_REQUIRED",
      responseChecksumValidation: "WHEN_REQUIRED",
    };
    if (options.endpoint) {
      config.endpoint = options.endpoint;
      config.forcePathStyle = true;
    }
    if (options.credentials) config.credentials = options.credentials;
    this.client = new S3Client(config);
  }

  private key(key: string): string {
    assertSafeKey(key);
    return `${this.options.prefix ?? ""}${key}`;
  }

  async put(key: string, body: ReadableStream<Uint8Array> | Uint8Array, options: { maxBytes?: number } = {}): Promise<StoredObject> {
    const Key = this.key(key);
    const max = options.maxBytes ?? Number.POSITIVE_INFINITY;
    let bytes = 0;
    let tooLarge = false;
    const source = body instanceof Uint8Array ? Readable.from([body]) : Readable.fromWeb(body as import("node:stream/web").ReadableStream);
    // The limit is counted as the bytes pass, so an over-long body fails before it is all read;
    // the upload then never completes, and S3 keeps the earlier object (if any) untouched.
    const counted = Readable.from(
      (async function* () {
        for await (const chunk of source as AsyncIterable<Buffer>) {
          bytes += chunk.length;
          if (bytes > max) {
            tooLarge = true;
            throw new TooLargeError(max);
          }
          yield chunk;
        }
      })(),
    );
    // Bodies under one part go up in a single PutObject; longer ones as a multipart upload,
    // which lib-storage aborts on failure so no parts are left behind.
    const upload = new Upload({ client: this.client, params: { Bucket: this.options.bucket, Key, Body: counted }, leavePartsOnError: false });
    try {
      await upload.done();
    } catch (err) {
      source.destroy();
      if (tooLarge) throw new TooLargeError(max);
      throw err;
    }
    return { key, bytes };
  }

  private async read(key: string, range?: string): Promise<ReadableStream<Uint8Array> | null> {
    try {
      const res = await this.client.send(new GetObjectCommand({ Bucket: this.options.bucket, Key: this.key(key), Range: range }));
      if (!res.Body) return null;
      return res.Body.transformToWebStream() as ReadableStream<Uint8Array>;
    } catch (err) {
      if (isMissing(err)) return null;
      throw err;
    }
  }

  get(key: string) {
    return this.read(key);
  }

  async getRange(key: string, start: number, end: number) {
    if (!Number.isSafeInteger(start) || !Number.isSafeInteger(end) || start < 0 || end < start) {
      throw new RangeError(`bad byte range ${start}-${end}`);
    }
    return this.read(key, `bytes=${start}-${end}`);
  }

  async size(key: string) {
    try {
      const res = await this.client.send(new HeadObjectCommand({ Bucket: this.options.bucket, Key: this.key(key) }));
      return res.ContentLength ?? null;
    } catch (err) {
      if (isMissing(err)) return null;
      throw err;
    }
  }

  async delete(key: string) {
    await this.client.send(new DeleteObjectCommand({ Bucket: this.options.bucket, Key: this.key(key) }));
  }
}
