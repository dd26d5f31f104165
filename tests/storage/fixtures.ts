// Real byte prefixes of the kinds an upload may be, built by hand from their specifications.
import { encodeWav } from "@/lib/audio";

const bytes = (...parts: (string | number[] | Uint8Array)[]) => {
  const chunks = parts.map((p) => (typeof p === "string" ? new TextEncoder().encode(p) : Uint8Array.from(p)));
  const out = new Uint8Array(chunks.reduce((n, c) => n + c.length, 0));
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.length;
  }
  return out;
};

/** A tenth of a second of a 1 kHz tone, 16-bit mono at 8 kHz, from our own encoder. */
export const wavFile = encodeWav([Float32Array.from({ length: 800 }, (_, i) => 0.3 * Math.sin((2 * Math.PI * 1000 * i) / 8000))], 8000);

/**
 * The first page of an Ogg Opus stream (RFC 3533 page header, RFC 7845 identification header):
 * version 0, beginning-of-stream flag, one 19-byte segment holding "OpusHead", version 1,
 * one channel, 312 samples pre-skip, 48 kHz input rate, gain 0, mapping family 0.
 */
export const oggOpusPage = bytes(
  "OggS",
  [0, 0x02],
  new Array(8).fill(0), // granule position
  [1, 0, 0, 0], // serial number
  [0, 0, 0, 0], // page sequence
  [0, 0, 0, 0], // CRC (not checked by the sniffer)
  [1, 19],
  "OpusHead",
  [1, 1, 0x38, 0x01, 0x80, 0xbb, 0, 0, 0, 0, 0],
);

/** The same page carrying a Vorbis identification header instead ("\x01vorbis"). */
export const oggVorbisPage = bytes("OggS", [0, 0x02], new Array(20).fill(0), [1, 30], [1], "vorbis", new Array(23).fill(0));

/** The same page carrying a FLAC-in-Ogg mapping header ("\x7fFLAC", RFC 9639 appendix). */
export const oggFlacPage = bytes("OggS", [0, 0x02], new Array(20).fill(0), [1, 13], [0x7f], "FLAC", [1, 0, 0, 1], "fLaC");

/**
 * An EBML header as MediaRecorder writes it (Matroska/WebM specification): EBMLVersion 1,
 * EBMLReadVersion 1, EBMLMaxIDLength 4, EBMLMaxSizeLength 8, DocType "webm", DocTypeVersion 4,
 * DocTypeReadVersion 2; then the start of a Segment.
 */
export const ebmlHeader = (docType = "webm") =>
  bytes(
    [0x1a, 0x45, 0xdf, 0xa3, 0x80 | (27 + docType.length)],
    [0x42, 0x86, 0x81, 0x01],
    [0x42, 0xf7, 0x81, 0x01],
    [0x42, 0xf2, 0x81, 0x04],
    [0x42, 0xf3, 0x81, 0x08],
    [0x42, 0x82, 0x80 | docType.length],
    docType,
    [0x42, 0x87, 0x81, 0x04],
    [0x42, 0x85, 0x81, 0x02],
    [0x18, 0x53, 0x80, 0x67, 0x01, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff],
  );

/** The PNG signature and the start of an IHDR chunk (PNG specification, 5.2 and 11.2.2). */
export const pngHead = bytes([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13], "IHDR", [0, 0, 0, 1, 0, 0, 0, 1, 8, 2, 0, 0, 0]);

/** SOI and an APP0 JFIF marker (JPEG File Interchange Format 1.02). */
export const jpegHead = bytes([0xff, 0xd8, 0xff, 0xe0, 0, 16], "JFIF", [0, 1, 2, 0, 0, 1, 0, 1, 0, 0]);

/** RIFF container of a lossy WebP (WebP container specification). */
export const webpHead = bytes("RIFF", [26, 0, 0, 0], "WEBP", "VP8 ", [14, 0, 0, 0], new Array(14).fill(0));

/** An ISO base media "ftyp" box with major brand "heic", as an iPhone writes it. */
export const heicHead = bytes([0, 0, 0, 24], "ftypheic", [0, 0, 0, 0], "mif1heic");

export const concat = bytes;
