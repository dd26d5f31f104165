// Content sniffing from the first bytes, against hand-built prefixes of each kind.
import { describe, expect, it } from "vitest";
import { peekStream, sniff } from "@/lib/storage/sniff";
import { concat, ebmlHeader, heicHead, jpegHead, oggOpusPage, oggVorbisPage, pngHead, wavFile, webpHead } from "./fixtures";

const streamOf = (...chunks: Uint8Array[]) =>
  new ReadableStream<Uint8Array>({
    start(c) {
      for (const chunk of chunks) c.enqueue(chunk);
      c.close();
    },
  });
const readAll = async (s: ReadableStream<Uint8Array>) => new Uint8Array(await new Response(s).arrayBuffer());

describe("sniff", () => {
  it("recognises each audio kind from its first bytes", () => {
    expect(sniff(wavFile.subarray(0, 64))).toMatchObject({ kind: "wav", type: "audio/wav", ext: "wav" });
    expect(sniff(oggOpusPage)).toMatchObject({ kind: "ogg", codec: "opus", type: "audio/ogg; codecs=opus", ext: "ogg" });
    expect(sniff(oggVorbisPage)).toMatchObject({ kind: "ogg", codec: "vorbis", type: "audio/ogg" });
    expect(sniff(ebmlHeader())).toMatchObject({ kind: "webm", type: "audio/webm", ext: "webm" });
    expect(sniff(ebmlHeader("matroska"))).toMatchObject({ kind: "matroska", ext: "mka" });
  });

  it("recognises each photo kind", () => {
    expect(sniff(jpegHead)).toMatchObject({ kind: "jpeg", type: "image/jpeg", ext: "jpg" });
    expect(sniff(pngHead)).toMatchObject({ kind: "png", type: "image/png", ext: "png" });
    expect(sniff(webpHead)).toMatchObject({ kind: "webp", type: "image/webp", ext: "webp" });
    expect(sniff(heicHead)).toMatchObject({ kind: "heic", type: "image/heic" });
  });

  it("knows nothing of text, truncated signatures or a RIFF of another form", () => {
    expect(sniff(new TextEncoder().encode("hello, this is not audio"))).toBeNull();
    expect(sniff(new Uint8Array(0))).toBeNull();
    expect(sniff(pngHead.subarray(0, 7))).toBeNull();
    expect(sniff(jpegHead.subarray(0, 2))).toBeNull();
    expect(sniff(concat("RIFF", [4, 0, 0, 0], "AVI "))).toBeNull();
    // "OggS" with no packet yet: still Ogg, codec unknown.
    expect(sniff(oggOpusPage.subarray(0, 10))).toEqual({ kind: "ogg", type: "audio/ogg", ext: "ogg" });
  });
});

describe("peekStream", () => {
  it("gathers the first bytes across small chunks and replays the whole body unchanged", async () => {
    const body = concat(oggOpusPage, new Uint8Array(2000).map((_, i) => i % 251));
    const pieces = [body.subarray(0, 3), new Uint8Array(0), body.subarray(3, 30), body.subarray(30, 700), body.subarray(700)];
    const peeked = await peekStream(streamOf(...pieces), 512);
    expect(peeked!.head.length).toBeGreaterThanOrEqual(512);
    expect(sniff(peeked!.head)).toMatchObject({ codec: "opus" });
    expect(await readAll(peeked!.stream)).toEqual(body);
  });

  it("returns a body shorter than the look-ahead whole, and null for an empty one", async () => {
    const peeked = await peekStream(streamOf(pngHead), 512);
    expect(peeked!.head).toEqual(pngHead);
    expect(await readAll(peeked!.stream)).toEqual(pngHead);
    expect(await peekStream(streamOf(new Uint8Array(0)), 512)).toBeNull();
    expect(await peekStream(streamOf(), 512)).toBeNull();
  });
});
