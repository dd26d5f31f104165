// Where recordings and photos are kept. One small interface; files under the data directory
// by default, S3-compatible object storage (./s3.ts) when GRINDFADE_S3_BUCKET is set.
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import fsp from "node:fs/promises";
import path from "node:path";
import { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import { serverEnv } from "@/lib/env";
import { S3Store } from "./s3";

export interface StoredObject {
  key: string;
  bytes: number;
}

export interface BlobStore {
  /** Writes the whole stream under key, replacing any earlier object; nothing partial is left on failure. */
  put(key: string, body: ReadableStream<Uint8Array> | Uint8Array, options?: { maxBytes?: number }): Promise<StoredObject>;
  get(key: string): Promise<ReadableStream<Uint8Array> | null>;
  size(key: string): Promise<number | null>;
  /**
   * Bytes start..end inclusive (HTTP Range semantics), or null when the object is absent.
   * Optional so that a store without ranged reads still satisfies the interface; callers fall
   * back to the whole object.
   */
  getRange?(key: string, start: number, end: number): Promise<ReadableStream<Uint8Array> | null>;
  delete(key: string): Promise<void>;
}

export class TooLargeError extends Error {
  constructor(readonly maxBytes: number) {
    super(`larger than ${maxBytes} bytes`);
  }
}

const SAFE_KEY = /^[a-z0-9][a-z0-9/_.-]{0,200}$/i;

/** Keys come from our own ids, but are checked anyway: a key must never climb out of its root. */
export function assertSafeKey(key: string): void {
  if (!SAFE_KEY.test(key) || key.includes("..")) throw new Error(`unsafe storage key ${JSON.stringify(key)}`);
}

export class LocalDiskStore implements BlobStore {
  constructor(private readonly root: string) {}

  private file(key: string): string {
    assertSafeKey(key);
    return path.join(this.root, key);
  }

  async put(key: string, body: ReadableStream<Uint8Array> | Uint8Array, options: { maxBytes?: number } = {}) {
    const target = this.file(key);
    await fsp.mkdir(path.dirname(target), { recursive: true });
    // A name of its own for every write, created exclusively: two uploads of one key at the same
    // moment never share a temporary file, and the last one to finish is the one kept.
    const temp = `${target}.part-${randomUUID()}`;
    let bytes = 0;
    const max = options.maxBytes ?? Number.POSITIVE_INFINITY;
    const source = body instanceof Uint8Array ? Readable.from([body]) : Readable.fromWeb(body as import("node:stream/web").ReadableStream);
    // The file is opened before the first byte: a write stream opens its file on its own time,
    // and one refused early could otherwise create it after the clean-up below has run.
    const handle = await fsp.open(temp, "wx");
    try {
      await pipeline(
        source,
        async function* (chunks: AsyncIterable<Buffer>) {
          for await (const chunk of chunks) {
            bytes += chunk.length;
            if (bytes > max) throw new TooLargeError(max);
            yield chunk;
          }
        },
        handle.createWriteStream(),
      );
      await fsp.rename(temp, target);
    } catch (err) {
      await handle.close().catch(() => {});
      await fsp.rm(temp, { force: true });
      throw err;
    }
    return { key, bytes };
  }

  async get(key: string) {
    const f = this.file(key);
    if (!fs.existsSync(f)) return null;
    return Readable.toWeb(fs.createReadStream(f)) as ReadableStream<Uint8Array>;
  }

  async getRange(key: string, start: number, end: number) {
    if (!Number.isSafeInteger(start) || !Number.isSafeInteger(end) || start < 0 || end < start) {
      throw new RangeError(`bad byte range ${start}-${end}`);
    }
    const f = this.file(key);
    if (!fs.existsSync(f)) return null;
    return Readable.toWeb(fs.createReadStream(f, { start, end })) as ReadableStream<Uint8Array>;
  }

  async size(key: string) {
    try {
      return (await fsp.stat(this.file(key))).size;
    } catch {
      return null;
    }
  }

  async delete(key: string) {
    await fsp.rm(this.file(key), { force: true });
  }
}

let store: BlobStore | null = null;

/** The configured store, made once per process. */
export function blobStore(): BlobStore {
  store ??= makeStore();
  return store;
}

function makeStore(): BlobStore {
  const env = serverEnv();
  if (!env.GRINDFADE_S3_BUCKET) return new LocalDiskStore(path.join(env.dataDir, "blobs"));
  const credentials =
    env.AWS_ACCESS_KEY_ID && env.AWS_SECRET_ACCESS_KEY
      ? { accessKeyId: env.AWS_ACCESS_KEY_ID, secretAccessKey: env.AWS_SECRET_ACCESS_KEY }
      : undefined;
  return new S3Store({
    bucket: env.GRINDFADE_S3_BUCKET,
    region: env.GRINDFADE_S3_REGION,
    ...(env.GRINDFADE_S3_ENDPOINT ? { endpoint: env.GRINDFADE_S3_ENDPOINT } : {}),
    // Without both keys the SDK's own chain (profile, instance role) supplies them.
    ...(credentials ? { credentials } : {}),
  });
}

/** For tests that change the configuration between cases. */
export function resetBlobStore(): void {
  store = null;
}
