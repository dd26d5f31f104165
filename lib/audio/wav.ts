// WAV decoding for the command-line analyzer and uploaded recordings: RIFF
// PCM 8/16/24/32-bit, IEEE float 32/64, plain or WAVE_FORMAT_EXTENSIBLE, any
// channel count. Samples are read straight from the bytes into typed arrays,
// because a ten-minute recording is tens of megabytes.

export type WavErrorCode = "empty" | "not-riff" | "truncated" | "unsupported";

export class WavFormatError extends Error {
  override name = "WavFormatError";
  constructor(
    readonly code: WavErrorCode,
    message: string,
  ) {
    super(message);
  }
}

export interface WavInfo {
  sampleRate: number;
  channels: number;
  bitsPerSample: number;
  encoding: "pcm" | "float";
  /** Sample frames (one sample per channel each). */
  frames: number;
  durationS: number;
}

export interface DecodedWav extends WavInfo {
  /** One Float32Array per channel, full scale = ±1. */
  channelData: Float32Array[];
}

export interface DecodedMonoWav extends WavInfo {
  /** Channels averaged into one, full scale = ±1. */
  samples: Float32Array;
}

const FORMAT_PCM = 0x0001;
const FORMAT_FLOAT = 0x0003;
const FORMAT_EXTENSIBLE = 0xfffe;

interface Layout extends WavInfo {
  dataOffset: number;
  blockAlign: number;
}

function fourCC(view: DataView, at: number): string {
  return String.fromCharCode(
    view.getUint8(at),
    view.getUint8(at + 1),
    view.getUint8(at + 2),
    view.getUint8(at + 3),
  );
}

/** Read the header and locate the samples without decoding them. */
export function readWavInfo(bytes: Uint8Array): WavInfo {
  const { dataOffset: _o, blockAlign: _b, ...info } = parseLayout(bytes);
  return info;
}

function parseLayout(bytes: Uint8Array): Layout {
  if (bytes.byteLength === 0) throw new WavFormatError("empty", "the file is empty");
  if (bytes.byteLength < 12) {
    const head = String.fromCharCode(...bytes.subarray(0, 4));
    if (!"RIFF".startsWith(head)) throw new WavFormatError("not-riff", "not a WAV file (no RIFF/WAVE header)");
    throw new WavFormatError("truncated", `the file is only ${bytes.byteLength} bytes, too short for a WAV header`);
  }
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const riff = fourCC(view, 0);
  if (riff === "RF64" || riff === "RIFX") {
    throw new WavFormatError("unsupported", `${riff} WAV files are not supported; save as standard little-endian RIFF WAV`);
  }
  if (riff !== "RIFF" || fourCC(view, 8) !== "WAVE") {
    throw new WavFormatError("not-riff", "not a WAV file (no RIFF/WAVE header)");
  }
  let pos = 12;
  let fmt: Omit<Layout, "dataOffset" | "frames" | "durationS"> | null = null;
  while (pos + 8 <= bytes.byteLength) {
    const id = fourCC(view, pos);
    const size = view.getUint32(pos + 4, true);
    const body = pos + 8;
    if (id === "fmt ") {
      if (size < 16 || body + size > bytes.byteLength) {
        throw new WavFormatError("truncated", "the WAV format chunk is cut short");
      }
      let tag = view.getUint16(body, true);
      const channels = view.getUint16(body + 2, true);
      const sampleRate = view.getUint32(body + 4, true);
      const blockAlign = view.getUint16(body + 12, true);
      const bitsPerSample = view.getUint16(body + 14, true);
      if (tag === FORMAT_EXTENSIBLE) {
        if (size < 40) throw new WavFormatError("truncated", "the extensible WAV format chunk is cut short");
        // The first two bytes of the sub-format GUID carry the plain format tag.
        tag = view.getUint16(body + 24, true);
      }
      if (tag !== FORMAT_PCM && tag !== FORMAT_FLOAT) {
        throw new WavFormatError(
          "unsupported",
          `unsupported WAV encoding (format tag 0x${tag.toString(16)}); use PCM or 32-bit float`,
        );
      }
      const encoding = tag === FORMAT_FLOAT ? "float" : "pcm";
      const okBits = encoding === "pcm" ? [8, 16, 24, 32] : [32, 64];
      if (!okBits.includes(bitsPerSample)) {
        throw new WavFormatError("unsupported", `unsupported ${encoding} sample size of ${bitsPerSample} bits`);
      }
      if (channels < 1) throw new WavFormatError("unsupported", "the WAV file declares zero channels");
      if (sampleRate < 1) throw new WavFormatError("unsupported", "the WAV file declares a sample rate of 0 Hz");
      if (blockAlign !== channels * (bitsPerSample / 8)) {
        throw new WavFormatError(
          "unsupported",
          `inconsistent WAV header: block size ${blockAlign} bytes for ${channels} channel(s) of ${bitsPerSample} bits`,
        );
      }
      fmt = { sampleRate, channels, bitsPerSample, encoding, blockAlign };
    } else if (id === "data") {
      if (!fmt) throw new WavFormatError("unsupported", "the WAV data chunk comes before its format chunk");
      const available = bytes.byteLength - body;
      // 0xFFFFFFFF is what some recorders leave when they never finalised
      // the header; it is as truncated as any other overstated size.
      if (size > available) {
        throw new WavFormatError(
          "truncated",
          `the WAV file is truncated: its data chunk declares ${size} bytes but only ${available} are present`,
        );
      }
      if (size % fmt.blockAlign !== 0) {
        throw new WavFormatError("truncated", "the WAV data ends in the middle of a sample frame");
      }
      const frames = size / fmt.blockAlign;
      return { ...fmt, dataOffset: body, frames, durationS: frames / fmt.sampleRate };
    }
    pos = body + size + (size & 1);
  }
  if (!fmt) throw new WavFormatError("truncated", "the WAV file has no format chunk");
  throw new WavFormatError("truncated", "the WAV file has no data chunk");
}

const LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/**
 * The data chunk as an aligned typed array of the sample type, so the inner
 * loops index memory directly instead of calling DataView per sample. The
 * bytes are copied once when the chunk does not start on a multiple of the
 * sample size (node's Buffer pool gives arbitrary offsets).
 */
function sampleView(bytes: Uint8Array, layout: Layout): Int16Array | Int32Array | Float32Array | Float64Array | null {
  const bps = layout.bitsPerSample >> 3;
  if (!LITTLE_ENDIAN || bps === 1 || bps === 3) return null;
  const length = layout.frames * layout.channels;
  let buffer = bytes.buffer as ArrayBuffer;
  let offset = bytes.byteOffset + layout.dataOffset;
  if (offset % bps !== 0) {
    buffer = bytes.slice(layout.dataOffset, layout.dataOffset + length * bps).buffer;
    offset = 0;
  }
  if (layout.encoding === "float") return bps === 4 ? new Float32Array(buffer, offset, length) : new Float64Array(buffer, offset, length);
  return bps === 2 ? new Int16Array(buffer, offset, length) : new Int32Array(buffer, offset, length);
}

function readChannel(
  bytes: Uint8Array,
  layout: Layout,
  view: Int16Array | Int32Array | Float32Array | Float64Array | null,
  channel: number,
  out: Float32Array,
  add: boolean,
  gain: number,
  fromFrame = 0,
  toFrame = layout.frames,
): void {
  const n = toFrame - fromFrame;
  const ch = layout.channels;
  const bits = layout.bitsPerSample;
  if (view) {
    const g = gain * (layout.encoding === "float" ? 1 : 1 / 2 ** (bits - 1));
    if (ch === 1 && !add) {
      for (let i = 0, p = fromFrame; i < n; i++, p++) out[i] = view[p] * g;
    } else {
      for (let i = 0, p = fromFrame * ch + channel; i < n; i++, p += ch) out[i] = add ? out[i] + view[p] * g : view[p] * g;
    }
    return;
  }
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const stride = layout.blockAlign;
  let p = layout.dataOffset + fromFrame * stride + channel * (bits >> 3);
  switch (bits) {
    case 8: {
      const g = gain / 128;
      for (let i = 0; i < n; i++, p += stride) {
        const v = (bytes[p] - 128) * g;
        out[i] = add ? out[i] + v : v;
      }
      return;
    }
    case 24: {
      const g = gain / 8388608;
      for (let i = 0; i < n; i++, p += stride) {
        // Shift the top byte up and back down to sign-extend 24 to 32 bits.
        const v = (((bytes[p] | (bytes[p + 1] << 8) | (bytes[p + 2] << 16)) << 8) >> 8) * g;
        out[i] = add ? out[i] + v : v;
      }
      return;
    }
    default: {
      // Big-endian hosts only: read little-endian words one by one.
      const g = layout.encoding === "float" ? gain : gain / 2 ** (bits - 1);
      for (let i = 0; i < n; i++, p += stride) {
        const raw =
          layout.encoding === "float"
            ? bits === 32
              ? dv.getFloat32(p, true)
              : dv.getFloat64(p, true)
            : bits === 16
              ? dv.getInt16(p, true)
              : dv.getInt32(p, true);
        out[i] = add ? out[i] + raw * g : raw * g;
      }
    }
  }
}

/** Decode every channel separately. Throws WavFormatError on a bad file. */
export function decodeWav(bytes: Uint8Array): DecodedWav {
  const layout = parseLayout(bytes);
  const channelData: Float32Array[] = [];
  const view = sampleView(bytes, layout);
  for (let c = 0; c < layout.channels; c++) {
    const ch = new Float32Array(layout.frames);
    readChannel(bytes, layout, view, c, ch, false, 1);
    channelData.push(ch);
  }
  const { dataOffset: _o, blockAlign: _b, ...info } = layout;
  return { ...info, channelData };
}

/** Decode and average all channels into one. Throws WavFormatError. */
export function decodeWavMono(bytes: Uint8Array): DecodedMonoWav {
  const layout = parseLayout(bytes);
  const samples = new Float32Array(layout.frames);
  const gain = 1 / layout.channels;
  const view = sampleView(bytes, layout);
  for (let c = 0; c < layout.channels; c++) {
    readChannel(bytes, layout, view, c, samples, c > 0, gain);
  }
  const { dataOffset: _o, blockAlign: _b, ...info } = layout;
  return { ...info, samples };
}

/**
 * Decode the mono mix in chunks of `chunkFrames` into one reused buffer and
 * hand each to `onChunk` (valid only during the call). A ten-minute file then
 * needs a few hundred kilobytes instead of a fresh 115 MB array, whose first
 * touch alone (page faults) costs more than the decoding.
 */
export function forEachMonoChunk(
  bytes: Uint8Array,
  chunkFrames: number,
  onChunk: (samples: Float32Array, firstFrame: number) => void,
): WavInfo {
  const layout = parseLayout(bytes);
  const view = sampleView(bytes, layout);
  const buffer = new Float32Array(Math.max(1, Math.min(chunkFrames, layout.frames)));
  const gain = 1 / layout.channels;
  for (let from = 0; from < layout.frames; from += chunkFrames) {
    const to = Math.min(layout.frames, from + chunkFrames);
    const out = to - from === buffer.length ? buffer : buffer.subarray(0, to - from);
    for (let c = 0; c < layout.channels; c++) readChannel(bytes, layout, view, c, out, c > 0, gain, from, to);
    onChunk(out, from);
  }
  const { dataOffset: _o, blockAlign: _b, ...info } = layout;
  return info;
}

/** Average channels into one (for callers that already hold channel arrays). */
export function mixDown(channels: readonly Float32Array[]): Float32Array {
  if (channels.length === 0) throw new RangeError("mixDown needs at least one channel");
  if (channels.length === 1) return channels[0];
  const n = channels[0].length;
  const out = new Float32Array(n);
  const g = 1 / channels.length;
  for (const ch of channels) {
    if (ch.length !== n) throw new RangeError(`channels differ in length: ${ch.length} vs ${n}`);
    for (let i = 0; i < n; i++) out[i] += ch[i] * g;
  }
  return out;
}

/** Encode mono or multichannel float samples as a WAV file (tests, synth). */
export function encodeWav(
  channels: readonly Float32Array[],
  sampleRate: number,
  format: { bitsPerSample: 8 | 16 | 24 | 32; encoding?: "pcm" | "float" } = { bitsPerSample: 16 },
): Uint8Array {
  const encoding = format.encoding ?? "pcm";
  const bits = format.bitsPerSample;
  if (encoding === "float" && bits !== 32) throw new RangeError(`float WAV must be 32-bit, got ${bits}`);
  const nCh = channels.length;
  const frames = channels[0]?.length ?? 0;
  const bytesPer = bits >> 3;
  const dataSize = frames * nCh * bytesPer;
  const buf = new Uint8Array(44 + dataSize + (dataSize & 1));
  const view = new DataView(buf.buffer);
  const put = (at: number, s: string) => {
    for (let i = 0; i < 4; i++) buf[at + i] = s.charCodeAt(i);
  };
  put(0, "RIFF");
  view.setUint32(4, buf.byteLength - 8, true);
  put(8, "WAVE");
  put(12, "fmt ");
  view.setUint32(16, 16, true);
  view.setUint16(20, encoding === "float" ? FORMAT_FLOAT : FORMAT_PCM, true);
  view.setUint16(22, nCh, true);
  view.setUint32(24, sampleRate, true);
  view.setUint32(28, sampleRate * nCh * bytesPer, true);
  view.setUint16(32, nCh * bytesPer, true);
  view.setUint16(34, bits, true);
  put(36, "data");
  view.setUint32(40, dataSize, true);
  let p = 44;
  for (let i = 0; i < frames; i++) {
    for (let c = 0; c < nCh; c++, p += bytesPer) {
      const x = channels[c][i];
      if (encoding === "float") {
        view.setFloat32(p, x, true);
        continue;
      }
      const clamped = x > 1 ? 1 : x < -1 ? -1 : x;
      const full = 2 ** (bits - 1);
      const q = Math.max(-full, Math.min(full - 1, Math.round(clamped * full)));
      if (bits === 8) buf[p] = q + 128;
      else if (bits === 16) view.setInt16(p, q, true);
      else if (bits === 24) {
        buf[p] = q & 0xff;
        buf[p + 1] = (q >> 8) & 0xff;
        buf[p + 2] = (q >> 16) & 0xff;
      } else view.setInt32(p, q, true);
    }
  }
  return buf;
}
