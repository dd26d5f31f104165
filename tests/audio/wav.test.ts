import { afterAll, describe, expect, it } from "vitest";
import { readFileSync, writeFileSync } from "node:fs";
import wavDecoder from "wav-decoder";
import nodeWav from "node-wav";
import { decodeWav, decodeWavMono, encodeWav, mixDown, WavFormatError } from "@/lib/audio/wav";
import { scratchDir, skipWithout, sox } from "./helpers";

const scratch = scratchDir();
afterAll(() => scratch.cleanup());

// The reference decoders read only plain format tags; sox writes 24- and
// 32-bit integer PCM as WAVE_FORMAT_EXTENSIBLE. Replacing the tag by the
// sub-format's own code (its GUID's first two bytes) is what the extensible
// header means, and lets them read the same samples.
function plainTagCopy(bytes: Uint8Array): Uint8Array {
  const copy = new Uint8Array(bytes);
  const view = new DataView(copy.buffer);
  if (view.getUint16(20, true) === 0xfffe) view.setUint16(20, view.getUint16(44, true), true);
  return copy;
}

const formats = [
  { label: "8-bit unsigned PCM", args: ["-b", "8", "-e", "unsigned-integer"], bits: 8 },
  { label: "16-bit PCM", args: ["-b", "16", "-e", "signed-integer"], bits: 16 },
  { label: "24-bit PCM", args: ["-b", "24", "-e", "signed-integer"], bits: 24 },
  { label: "32-bit PCM", args: ["-b", "32", "-e", "signed-integer"], bits: 32 },
  { label: "32-bit float", args: ["-b", "32", "-e", "floating-point"], bits: 32 },
];

describe.skipIf(skipWithout("sox"))("decoding files written by sox against reference decoders", () => {
  for (const f of formats) {
    for (const channels of [1, 2]) {
      it(`${f.label}, ${channels === 1 ? "mono" : "stereo"}`, () => {
        const path = scratch.path(`${f.bits}-${f.args[3]}-${channels}.wav`);
        // Two different tones per channel so a channel swap would show.
        const tones = channels === 1 ? ["sine", "440"] : ["sine", "440", "sine", "1234"];
        sox(["-n", "-r", "44100", ...f.args, "-c", String(channels), path, "synth", "0.2", ...tones, "vol", "0.7"]);
        const bytes = new Uint8Array(readFileSync(path));
        const ours = decodeWav(bytes);
        expect(ours.sampleRate).toBe(44100);
        expect(ours.channels).toBe(channels);
        expect(ours.frames).toBe(8820);
        // References: wav-decoder 1.3 and node-wav 0.0.2 from npm.
        const refA = wavDecoder.decode.sync(Buffer.from(plainTagCopy(bytes)), { symmetric: true });
        // node-wav reads float data through a Float32Array view and fails on
        // sox's float files, whose samples start at an offset not divisible by
        // 4; wav-decoder alone is the reference there.
        const isFloat = f.args[3] === "floating-point";
        const refB = isFloat ? refA : nodeWav.decode(Buffer.from(plainTagCopy(bytes)));
        // The references scale positive integers by 2^(b-1)-1 or offset 8-bit
        // data by 127.5; allow one step of the format.
        // Float32 output itself resolves about 6e-8 near full scale.
        const lsb = Math.max(1.2e-7, 2 / 2 ** f.bits);
        for (let c = 0; c < channels; c++) {
          let maxA = 0;
          let maxB = 0;
          for (let i = 0; i < ours.frames; i++) {
            maxA = Math.max(maxA, Math.abs(ours.channelData[c][i] - refA.channelData[c][i]));
            maxB = Math.max(maxB, Math.abs(ours.channelData[c][i] - refB.channelData[c][i]));
          }
          expect(maxA).toBeLessThanOrEqual(lsb);
          expect(maxB).toBeLessThanOrEqual(lsb);
        }
        const mono = decodeWavMono(bytes);
        const mixed = mixDown(ours.channelData);
        for (let i = 0; i < ours.frames; i += 97) expect(mono.samples[i]).toBeCloseTo(mixed[i], 6);
      });
    }
  }

  it("rejects A-law as unsupported, naming the format", () => {
    const path = scratch.path("alaw.wav");
    sox(["-n", "-r", "8000", "-e", "a-law", path, "synth", "0.1", "sine", "440"]);
    expect(() => decodeWav(new Uint8Array(readFileSync(path)))).toThrow(/format tag 0x6/);
  });
});

describe("bad files", () => {
  const good = encodeWav([new Float32Array(1000).fill(0.25)], 16000, { bitsPerSample: 16 });
  const code = (bytes: Uint8Array) => {
    try {
      decodeWav(bytes);
      return "ok";
    } catch (e) {
      expect(e).toBeInstanceOf(WavFormatError);
      return (e as WavFormatError).code;
    }
  };
  it("empty", () => expect(code(new Uint8Array(0))).toBe("empty"));
  it("not RIFF", () => expect(code(new TextEncoder().encode("hello, this is not audio at all"))).toBe("not-riff"));
  it("truncated data", () => expect(code(good.subarray(0, 500))).toBe("truncated"));
  it("truncated header", () => expect(code(good.subarray(0, 30))).toBe("truncated"));
  it("half a sample frame at the end", () => {
    const odd = new Uint8Array(good.subarray(0, 44 + 999));
    new DataView(odd.buffer).setUint32(40, 999, true);
    expect(code(odd)).toBe("truncated");
  });
  it("an unsupported sample size", () => {
    const b = new Uint8Array(good);
    new DataView(b.buffer).setUint16(34, 12, true);
    expect(code(b)).toBe("unsupported");
  });
  it("round trip of our own encoder", () => {
    const x = new Float32Array([0, 0.5, -0.5, 1, -1]);
    const d = decodeWav(encodeWav([x], 16000, { bitsPerSample: 24 }));
    for (let i = 0; i < x.length; i++) expect(d.channelData[0][i]).toBeCloseTo(Math.min(x[i], 1 - 2 ** -23), 6);
    writeFileSync(scratch.path("rt.wav"), encodeWav([x], 16000, { bitsPerSample: 16 }));
  });
});
