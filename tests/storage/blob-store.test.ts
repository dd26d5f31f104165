// One contract for every BlobStore: the data directory and S3 (against a fake S3 server the
// test starts itself) must behave the same to the routes above them.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { LocalDiskStore, TooLargeError, type BlobStore } from "@/lib/storage";
import { S3Store } from "@/lib/storage/s3";
import { FAKE_S3_CREDENTIALS, startFakeS3 } from "./fake-s3";

const readAll = async (s: ReadableStream<Uint8Array> | null) => (s ? new Uint8Array(await new Response(s).arrayBuffer()) : null);
const streamOf = (data: Uint8Array, piece = 64 * 1024) => {
  let at = 0;
  return new ReadableStream<Uint8Array>({
    pull(c) {
      if (at >= data.length) return c.close();
      c.enqueue(data.slice(at, at + piece));
      at += piece;
    },
  });
};
/** Every byte value, in an order that a shifted or truncated copy cannot match by chance. */
const pattern = (n: number) => Uint8Array.from({ length: n }, (_, i) => (i * 31 + (i >> 8)) & 0xff);

type Fixture = { store: BlobStore; leftovers: () => Promise<string[]>; stop: () => Promise<void> };

const stores: Record<string, () => Promise<Fixture>> = {
  LocalDiskStore: async () => {
    const root = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-blobs-"));
    const walk = (dir: string): string[] =>
      fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => (e.isDirectory() ? walk(path.join(dir, e.name)) : [path.relative(root, path.join(dir, e.name))]));
    return { store: new LocalDiskStore(root), leftovers: async () => walk(root).sort(), stop: async () => fs.rmSync(root, { recursive: true, force: true }) };
  },
  S3Store: async () => {
    const s3 = await startFakeS3("grindfade-test");
    const store = new S3Store({ bucket: "grindfade-test", region: "us-east-1", endpoint: s3.endpoint, credentials: FAKE_S3_CREDENTIALS });
    return { store, leftovers: s3.keys, stop: s3.stop };
  },
};

for (const [name, make] of Object.entries(stores)) {
  describe(`${name} contract`, () => {
    let f: Fixture;
    beforeAll(async () => {
      f = await make();
    });
    afterAll(async () => {
      await f?.stop();
    });

    it("round-trips a streamed body byte for byte, reports its size and reads ranges", async () => {
      const data = pattern(300_000);
      expect(await f.store.put("recordings/a.webm", streamOf(data), { maxBytes: 1_000_000 })).toEqual({ key: "recordings/a.webm", bytes: data.length });
      expect(await readAll(await f.store.get("recordings/a.webm"))).toEqual(data);
      expect(await f.store.size("recordings/a.webm")).toBe(data.length);
      expect(await readAll((await f.store.getRange!("recordings/a.webm", 1000, 1999))!)).toEqual(data.subarray(1000, 2000));
      // A Uint8Array body, replacing the earlier object.
      expect((await f.store.put("recordings/a.webm", data.subarray(0, 10))).bytes).toBe(10);
      expect(await readAll(await f.store.get("recordings/a.webm"))).toEqual(data.subarray(0, 10));
    });

    it("answers null for an absent object and forgets a deleted one", async () => {
      expect(await f.store.get("recordings/missing.wav")).toBeNull();
      expect(await f.store.size("recordings/missing.wav")).toBeNull();
      expect(await f.store.getRange!("recordings/missing.wav", 0, 9)).toBeNull();
      await f.store.put("photos/b.png", pattern(100));
      await f.store.delete("photos/b.png");
      expect(await f.store.size("photos/b.png")).toBeNull();
      expect(await f.store.get("photos/b.png")).toBeNull();
      // Deleting what is not there is not an error.
      await f.store.delete("photos/b.png");
    });

    it("refuses a body past the limit, leaving nothing behind and an earlier object intact", async () => {
      const kept = pattern(500);
      await f.store.put("recordings/c.ogg", kept);
      const before = await f.leftovers();
      await expect(f.store.put("recordings/c.ogg", streamOf(pattern(200_001), 10_000), { maxBytes: 200_000 })).rejects.toBeInstanceOf(TooLargeError);
      await expect(f.store.put("recordings/new.ogg", pattern(200_001), { maxBytes: 200_000 })).rejects.toBeInstanceOf(TooLargeError);
      expect(await f.leftovers()).toEqual(before);
      expect(await readAll(await f.store.get("recordings/c.ogg"))).toEqual(kept);
      // Exactly at the limit is allowed.
      expect((await f.store.put("recordings/new.ogg", pattern(200_000), { maxBytes: 200_000 })).bytes).toBe(200_000);
    });

    it("refuses a key that could climb out of its root", async () => {
      await expect(f.store.put("../outside", pattern(1))).rejects.toThrow(/unsafe storage key/);
      await expect(f.store.get("recordings/../../x")).rejects.toThrow(/unsafe storage key/);
    });
  });
}
