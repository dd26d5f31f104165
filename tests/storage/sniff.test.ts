// Content sniffing from the first bytes, against hand-built prefixes of each kind.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { isKeptRecording, peekStream, sniff, SNIFF_BYTES } from "@/lib/storage/sniff";
import { skipWithout } from "../audio/helpers";
import { encodeWith, type EncodedKind } from "./encoded";
import { concat, ebmlHeader, heicHead, jpegHead, oggFlacPage, oggOpusPage, oggVorbisPage, pngHead, wavFile, webpHead } from "./fixtures";

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

// Real files, made at test time by Debian's ffmpeg (tests/storage/encoded.ts names the arguments)
// from a WAV written by our own encoder: the first bytes each kind really starts with.
describe.skipIf(skipWithout("ffmpeg"))("sniff on files encoded by ffmpeg (Debian)", () => {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-sniff-enc-"));
  const wav = path.join(dir, "tone.wav");
  fs.writeFileSync(wav, wavFile);
  afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));
  const head = (kind: EncodedKind) => new Uint8Array(fs.readFileSync(encodeWith(kind, wav, dir))).subarray(0, SNIFF_BYTES);

  it.each([
    ["webkit-mp4", { kind: "mp4", type: "audio/mp4", ext: "m4a", brand: "iso5" }],
    ["m4a", { kind: "mp4", type: "audio/mp4", ext: "m4a", brand: "M4A " }],
    ["webm-opus", { kind: "webm", type: "audio/webm", ext: "webm" }],
    ["ogg-opus", { kind: "ogg", codec: "opus", type: "audio/ogg; codecs=opus", ext: "ogg" }],
    ["ogg-vorbis", { kind: "ogg", codec: "vorbis", type: "audio/ogg", ext: "ogg" }],
    ["mp3", { kind: "mp3", type: "audio/mpeg", ext: "mp3" }],
    ["mp3-bare", { kind: "mp3", type: "audio/mpeg", ext: "mp3" }],
  ] as const)("%s is recognised and kept as a recording", (kind, expected) => {
    const sniffed = sniff(head(kind));
    expect(sniffed).toEqual(expected);
    expect(isKeptRecording(sniffed)).toBe(true);
  });

  it("keeps no photo, Matroska, Ogg FLAC or text as a recording", () => {
    for (const b of [jpegHead, pngHead, webpHead, heicHead, ebmlHeader("matroska"), oggFlacPage, new TextEncoder().encode("ID3 but then nothing useful")]) {
      expect(isKeptRecording(sniff(b))).toBe(false);
    }
  });
});

describe("sniff: ISO base media and MPEG audio edge cases", () => {
  it("tells an MP4 of sound from a HEIF photo by its major brand, and refuses unknown brands", () => {
    expect(sniff(concat([0, 0, 0, 20], "ftypmp42", [0, 0, 0, 0], "isom"))).toMatchObject({ kind: "mp4", brand: "mp42" });
    expect(sniff(concat([0, 0, 0, 20], "ftypM4A ", [0, 0, 0, 0], "isom"))).toMatchObject({ kind: "mp4", type: "audio/mp4" });
    expect(sniff(concat([0, 0, 0, 20], "ftypqt  ", [0, 0, 0, 0], "qt  "))).toBeNull();
    expect(sniff(concat([0, 0, 0, 20], "ftypavif", [0, 0, 0, 0], "mif1"))).toBeNull();
    expect(sniff(concat([0, 0, 0, 20], "ftyp"))).toBeNull();
  });

  it("reads an MPEG frame header only when it is layer III with a real bitrate and rate", () => {
    expect(sniff(Uint8Array.from([0xff, 0xfb, 0x90, 0x64]))).toMatchObject({ kind: "mp3" }); // MPEG-1 layer III, 128 kbit/s, 44.1 kHz
    expect(sniff(Uint8Array.from([0xff, 0xf3, 0x90, 0x64]))).toMatchObject({ kind: "mp3" }); // MPEG-2 layer III
    expect(sniff(Uint8Array.from([0xff, 0xfd, 0x90, 0x64]))).toBeNull(); // layer II
    expect(sniff(Uint8Array.from([0xff, 0xfb, 0xf0, 0x64]))).toBeNull(); // bad bitrate index
    expect(sniff(Uint8Array.from([0xff, 0xfb, 0x9c, 0x64]))).toBeNull(); // reserved sample rate
    expect(sniff(Uint8Array.from([0xff, 0xf1, 0x50, 0x80]))).toBeNull(); // an ADTS AAC header (layer 0)
    expect(sniff(concat("ID3", [4, 0, 0, 0, 0, 0, 0x23]))).toMatchObject({ kind: "mp3" });
    expect(sniff(concat("ID3", [4, 0, 0, 0, 0x80, 0, 0x23]))).toBeNull(); // size bytes are syncsafe: no high bit
  });
});
