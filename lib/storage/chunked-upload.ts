// The bench screen's side of the resumable recording upload (see
// app/api/sessions/[sessionId]/recording/chunks): asks how much the server already has, sends
// the rest in chunks, and after a dropped connection asks again and goes on from there.

export interface ChunkedUploadOptions {
  /** Bytes per PUT; 1 MB keeps a resend after a drop short on a phone's connection. */
  chunkBytes?: number;
  fetchFn?: typeof fetch;
  /** Failed requests in a row (network errors, 5xx) before giving up. */
  maxRetries?: number;
  /** Wait before retry n (1-based); grows so a phone walking back into coverage gets time. */
  retryDelayMs?: (attempt: number) => number;
  onProgress?: (received: number, total: number) => void;
}

export interface ChunkedUploadResult {
  bytes: number;
}

/** An answer the server gave on purpose (4xx other than a gap): resending the same will not help. */
export class UploadRefusedError extends Error {
  constructor(
    readonly status: number,
    message: string,
  ) {
    super(message);
  }
}

class Retryable extends Error {}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function json(res: Response): Promise<Record<string, unknown>> {
  try {
    return (await res.json()) as Record<string, unknown>;
  } catch {
    return {};
  }
}

export async function uploadInChunks(url: string, blob: Blob, options: ChunkedUploadOptions = {}): Promise<ChunkedUploadResult> {
  const chunkBytes = options.chunkBytes ?? 1024 * 1024;
  const fetchFn = options.fetchFn ?? fetch;
  const maxRetries = options.maxRetries ?? 8;
  const delay = options.retryDelayMs ?? ((n) => Math.min(30_000, 500 * 2 ** (n - 1)));
  const total = blob.size;
  if (total === 0) throw new UploadRefusedError(400, "The recording is empty.");
  if (!(chunkBytes > 0)) throw new RangeError("chunkBytes must be positive");

  const call = async (init: RequestInit): Promise<Response> => {
    let res: Response;
    try {
      res = await fetchFn(url, { ...init, cache: "no-store" });
    } catch (err) {
      throw new Retryable(err instanceof Error ? err.message : String(err));
    }
    if (res.status >= 500) throw new Retryable(`server answered ${res.status}`);
    return res;
  };

  /** The offset to send from: what the server has of this same upload, else 0. */
  const askOffset = async (): Promise<number> => {
    const res = await call({ method: "GET" });
    const body = await json(res);
    if (!res.ok) throw new UploadRefusedError(res.status, String(body.message ?? `server answered ${res.status}`));
    // An unfinished upload of another length is someone else's (an earlier recording): start over.
    return body.total === total && typeof body.received === "number" ? body.received : 0;
  };

  let failures = 0;
  let conflicts = 0;
  let offset: number | null = null;
  for (;;) {
    try {
      offset ??= await askOffset();
      options.onProgress?.(offset, total);
      const end: number = Math.min(offset + chunkBytes, total) - 1;
      const res = await call({
        method: "PUT",
        headers: { "content-range": `bytes ${offset}-${end}/${total}`, "content-type": "application/octet-stream" },
        body: blob.slice(offset, end + 1),
      });
      const body = await json(res);
      if (res.status === 201) {
        options.onProgress?.(total, total);
        return { bytes: typeof body.bytes === "number" ? body.bytes : total };
      }
      if (res.status === 409 && typeof body.expectedOffset === "number") {
        // Two in a row means the server and this client disagree about more than an offset.
        if (++conflicts > 2) throw new UploadRefusedError(409, String(body.message));
        offset = body.expectedOffset;
        continue;
      }
      if (!res.ok) throw new UploadRefusedError(res.status, String(body.message ?? `server answered ${res.status}`));
      offset = typeof body.received === "number" ? body.received : end + 1;
      failures = 0;
      conflicts = 0;
    } catch (err) {
      if (!(err instanceof Retryable)) throw err;
      if (++failures > maxRetries) throw new Error(`The upload stopped after ${maxRetries} retries: ${err.message}`);
      await sleep(delay(failures));
      // Whether the lost request arrived is unknown: ask the server rather than guess.
      offset = null;
    }
  }
}
