// Uploads are kept whole or not at all: what arrived is compared with what the sender declared
// it sent, its length (Content-Length) and, when it gives one, its SHA-256 digest (Content-Digest,
// RFC 9530: `sha-256=:<base64>:`). A body cut short on the way (a proxy's cap, a dropped
// connection) or changed is refused, and nothing of it is kept.
import { createHash } from "node:crypto";
import { BadRequestError } from "@/lib/errors";
import { TooLargeError, type BlobStore } from "./index";

export interface DeclaredBody {
  bytes: number | null;
  /** Base64 SHA-256 of the whole body. */
  sha256: string | null;
}

const DIGEST = /(?:^|,)\s*sha-256\s*=\s*:([A-Za-z0-9+/]{43}=):\s*(?:,|$)/i;

/** What the request's headers say about its body; a malformed length or digest is refused. */
export function declaredBody(headers: Pick<Headers, "get">): DeclaredBody {
  const length = headers.get("content-length");
  if (length !== null && !/^\d{1,15}$/.test(length.trim())) throw new BadRequestError("Content-Length must be a whole number of bytes.");
  const digestHeader = headers.get("content-digest");
  let sha256: string | null = null;
  if (digestHeader !== null) {
    const m = DIGEST.exec(digestHeader);
    if (!m) throw new BadRequestError("Content-Digest must carry a sha-256 digest, as sha-256=:<base64>:.");
    sha256 = m[1]!;
  }
  return { bytes: length === null ? null : Number(length), sha256 };
}

/** The stream as it is, with the SHA-256 of everything that passed through it once it has ended. */
export function digesting(body: ReadableStream<Uint8Array>): { stream: ReadableStream<Uint8Array>; sha256(): string } {
  const hash = createHash("sha256");
  let result: string | null = null;
  const stream = body.pipeThrough(
    new TransformStream<Uint8Array, Uint8Array>({
      transform(chunk, controller) {
        hash.update(chunk);
        controller.enqueue(chunk);
      },
      flush() {
        result = hash.digest("base64");
      },
    }),
  );
  return {
    stream,
    sha256: () => {
      if (result === null) throw new Error("the body has not been read to its end");
      return result;
    },
  };
}

/** Refuses a body whose stored length or digest is not what was declared. */
export function assertIntact(declared: DeclaredBody, stored: { bytes: number; sha256: string }, what: string): void {
  if (declared.bytes !== null && declared.bytes !== stored.bytes) {
    throw new BadRequestError(`The ${what} arrived with ${stored.bytes} of its ${declared.bytes} bytes; nothing was kept. Send it again.`);
  }
  if (declared.sha256 !== null && declared.sha256 !== stored.sha256) {
    throw new BadRequestError(`The ${what} arrived changed (its SHA-256 does not match Content-Digest); nothing was kept. Send it again.`);
  }
}

/** Nothing declared: the body is taken as it arrives (a caller inside the server). */
export const NOTHING_DECLARED: DeclaredBody = { bytes: null, sha256: null };

/**
 * Stores the body under `key`, no more than `maxBytes` (else `tooLarge()`), and checks it against
 * what was declared; a body that is not whole is deleted again and refused. Answers its length.
 */
export async function storeWhole(
  store: BlobStore,
  key: string,
  body: ReadableStream<Uint8Array>,
  limit: { maxBytes: number; tooLarge: () => Error },
  declared: DeclaredBody,
  what: string,
): Promise<number> {
  const read = digesting(body);
  let bytes: number;
  try {
    ({ bytes } = await store.put(key, read.stream, { maxBytes: limit.maxBytes }));
  } catch (err) {
    if (err instanceof TooLargeError) throw limit.tooLarge();
    throw err;
  }
  try {
    assertIntact(declared, { bytes, sha256: read.sha256() }, what);
  } catch (err) {
    await store.delete(key).catch(() => {});
    throw err;
  }
  return bytes;
}
