// What an upload really is, read from its first bytes. The declared content type is whatever
// the client says; the bytes are what gets played back or shown, so they decide.

export type SniffedKind = "webm" | "matroska" | "ogg" | "wav" | "mp4" | "mp3" | "jpeg" | "png" | "webp" | "heic";

export interface Sniffed {
  kind: SniffedKind;
  /** The media type to store and serve the object with. */
  type: string;
  /** File extension for the storage key. */
  ext: string;
  /** For Ogg: the codec named by the first page ("opus", "vorbis"), or undefined when unknown. */
  codec?: string;
  /** For ISO base media files: the major brand of the `ftyp` box ("M4A ", "iso5", "mp42"…). */
  brand?: string;
}

/**
 * Enough bytes for every check below: an Ogg first page is 27 header bytes plus up to 255
 * segment-table bytes before its packet, and the EBML header names its DocType within its
 * first few dozen bytes.
 */
export const SNIFF_BYTES = 512;

const ascii = (b: Uint8Array, at: number, text: string) => {
  if (b.length < at + text.length) return false;
  for (let i = 0; i < text.length; i++) if (b[at + i] !== text.charCodeAt(i)) return false;
  return true;
};
const bytesAt = (b: Uint8Array, at: number, sig: readonly number[]) =>
  b.length >= at + sig.length && sig.every((v, i) => b[at + i] === v);

/** The DocType string inside an EBML header ("webm", "matroska"), or null when it cannot be read. */
function ebmlDocType(b: Uint8Array): string | null {
  // DocType is element 0x4282; its size is an EBML variable-length integer.
  for (let i = 4; i + 3 < b.length; i++) {
    if (b[i] !== 0x42 || b[i + 1] !== 0x82) continue;
    const first = b[i + 2]!;
    let width = 1;
    while (width <= 8 && !(first & (0x80 >> (width - 1)))) width++;
    if (width > 8 || i + 2 + width > b.length) return null;
    let size = first & (0xff >> width);
    for (let k = 1; k < width; k++) size = size * 256 + b[i + 2 + k]!;
    const start = i + 2 + width;
    if (size > 32 || start + size > b.length) return null;
    return String.fromCharCode(...b.subarray(start, start + size)).replace(/\0+$/, "");
  }
  return null;
}

/** The codec of an Ogg stream's first packet, read from its first page. */
function oggCodec(b: Uint8Array): string | undefined {
  // Page header: "OggS", version, type, granule (8), serial (4), sequence (4), CRC (4), segment count.
  if (b.length < 27) return undefined;
  const packet = 27 + b[26]!;
  if (ascii(b, packet, "OpusHead")) return "opus";
  if (b[packet] === 0x01 && ascii(b, packet + 1, "vorbis")) return "vorbis";
  if (ascii(b, packet, "\x7fFLAC")) return "flac";
  return undefined;
}

/**
 * Major brands of ISO base media files (ISO/IEC 14496-12 `ftyp`) that carry sound: "M4A " and
 * "M4B " (Apple's audio brands; iPhone voice memos), "mp41"/"mp42" (MPEG-4 Part 14; many Android
 * recorders), "isom" and "iso2"–"iso9" (the generic brands; Safari's MediaRecorder writes a
 * fragmented file, and ffmpeg's fragmented MP4 is "iso5"), "dash" (fragmented for streaming),
 * "3gp4"–"3gp6" (3GPP, older Android recorders).
 */
const MP4_AUDIO_BRANDS = new Set(["M4A ", "M4B ", "mp41", "mp42", "isom", "iso2", "iso3", "iso4", "iso5", "iso6", "iso7", "iso8", "iso9", "dash", "3gp4", "3gp5", "3gp6"]);
/** HEIF image brands (ISO/IEC 23008-12) kept as photos; "mif1" is the generic one. */
const HEIC_BRANDS = new Set(["heic", "heix", "mif1"]);

/**
 * An MPEG audio frame header (ISO/IEC 11172-3, 13818-3): an 11-bit sync word, a version other
 * than "reserved", layer III, a bitrate index other than "free" or "bad", a sample-rate index
 * other than "reserved". A file may start with an ID3v2 tag instead ("ID3", version, flags,
 * a syncsafe size), which is how most recorders and encoders begin an MP3.
 */
function mp3Frame(b: Uint8Array, at: number): boolean {
  if (b.length < at + 4 || b[at] !== 0xff || (b[at + 1]! & 0xe0) !== 0xe0) return false;
  const version = (b[at + 1]! >> 3) & 3;
  const layer = (b[at + 1]! >> 1) & 3;
  const bitrate = b[at + 2]! >> 4;
  const rate = (b[at + 2]! >> 2) & 3;
  return version !== 1 && layer === 1 && bitrate !== 0 && bitrate !== 15 && rate !== 3;
}

const id3Tag = (b: Uint8Array) =>
  ascii(b, 0, "ID3") && b.length >= 10 && b[3]! >= 2 && b[3]! <= 4 && [6, 7, 8, 9].every((i) => b[i]! < 0x80);

/** Identifies an upload from its first bytes (see SNIFF_BYTES), or null when it is none of the known kinds. */
export function sniff(head: Uint8Array): Sniffed | null {
  if (bytesAt(head, 0, [0x1a, 0x45, 0xdf, 0xa3])) {
    const docType = ebmlDocType(head);
    if (docType === "matroska") return { kind: "matroska", type: "audio/x-matroska", ext: "mka" };
    // MediaRecorder always writes DocType "webm"; a header too short to name one is taken as WebM.
    return { kind: "webm", type: "audio/webm", ext: "webm" };
  }
  if (ascii(head, 0, "OggS")) {
    const codec = oggCodec(head);
    return { kind: "ogg", type: codec === "opus" ? "audio/ogg; codecs=opus" : "audio/ogg", ext: "ogg", ...(codec ? { codec } : {}) };
  }
  if (ascii(head, 0, "RIFF") && ascii(head, 8, "WAVE")) return { kind: "wav", type: "audio/wav", ext: "wav" };
  if (ascii(head, 0, "RIFF") && ascii(head, 8, "WEBP")) return { kind: "webp", type: "image/webp", ext: "webp" };
  if (bytesAt(head, 0, [0xff, 0xd8, 0xff])) return { kind: "jpeg", type: "image/jpeg", ext: "jpg" };
  if (bytesAt(head, 0, [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])) return { kind: "png", type: "image/png", ext: "png" };
  // ISO base media: box size (4), "ftyp", major brand. iPhones write "heic" or "heix"; "mif1" is the generic HEIF brand.
  if (ascii(head, 4, "ftyp") && head.length >= 12) {
    const brand = String.fromCharCode(...head.subarray(8, 12));
    if (HEIC_BRANDS.has(brand)) return { kind: "heic", type: "image/heic", ext: "heic" };
    if (MP4_AUDIO_BRANDS.has(brand)) return { kind: "mp4", type: "audio/mp4", ext: "m4a", brand };
    return null;
  }
  if (id3Tag(head) || mp3Frame(head, 0)) return { kind: "mp3", type: "audio/mpeg", ext: "mp3" };
  return null;
}

/**
 * Reads at least `bytes` bytes (or the whole body when shorter) without consuming the stream:
 * the returned stream replays them before the rest. Null when the body is empty.
 */
export async function peekStream(
  body: ReadableStream<Uint8Array>,
  bytes: number = SNIFF_BYTES,
): Promise<{ head: Uint8Array; stream: ReadableStream<Uint8Array> } | null> {
  const reader = body.getReader();
  const read: Uint8Array[] = [];
  let total = 0;
  let done = false;
  while (total < bytes) {
    const next = await reader.read();
    if (next.done) {
      done = true;
      break;
    }
    if (next.value.byteLength === 0) continue;
    read.push(next.value);
    total += next.value.byteLength;
  }
  if (total === 0) return null;
  const head = new Uint8Array(total);
  let at = 0;
  for (const chunk of read) {
    head.set(chunk, at);
    at += chunk.byteLength;
  }
  let replay: Uint8Array | null = head;
  const stream = new ReadableStream<Uint8Array>({
    async pull(controller) {
      if (replay) {
        controller.enqueue(replay);
        replay = null;
        if (done) controller.close();
        return;
      }
      const next = await reader.read();
      if (next.done) controller.close();
      else controller.enqueue(next.value);
    },
    cancel: (reason) => reader.cancel(reason),
  });
  return { head, stream };
}

/**
 * The recordings Grindfade keeps and plays back: WebM (Chrome's and Android's MediaRecorder),
 * MP4/M4A with AAC (Safari's MediaRecorder, iPhone and Android recorder apps), Ogg with Opus
 * (Firefox) or Vorbis (some recorder apps), MP3 and WAV. Plain Matroska and Ogg FLAC are refused:
 * no phone records them and the players are not tested with them.
 */
export function isKeptRecording(s: Sniffed | null): boolean {
  if (!s) return false;
  if (s.kind === "ogg") return s.codec === "opus" || s.codec === "vorbis";
  return s.kind === "webm" || s.kind === "wav" || s.kind === "mp4" || s.kind === "mp3";
}

/** The refusal for anything else, in words a technician can act on. */
export const NOT_A_RECORDING =
  "Recordings must be audio in MP4/M4A (AAC), WebM, Ogg, MP3 or WAV; this file is none of them. Record again on the bench screen, or pick the file your phone's recorder made.";
