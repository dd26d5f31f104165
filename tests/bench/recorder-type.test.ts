// The recording format follows what MediaRecorder.isTypeSupported answers, browser by browser.
import { describe, expect, it } from "vitest";
import { chooseRecordingType } from "@/lib/bench/recorder-type";
import { isKeptRecording, sniff } from "@/lib/storage/sniff";

const supports = (...types: string[]) => (t: string) => types.includes(t);

describe("chooseRecordingType", () => {
  it("takes Opus in WebM where the browser has it (Chrome, Edge, Android)", () => {
    expect(chooseRecordingType(supports("audio/webm;codecs=opus", "audio/mp4", "audio/webm"))).toBe("audio/webm;codecs=opus");
  });
  it("takes AAC in MP4 on Safari, which records nothing else", () => {
    expect(chooseRecordingType(supports("audio/mp4"))).toBe("audio/mp4");
    expect(chooseRecordingType(supports("audio/mp4;codecs=mp4a.40.2", "audio/mp4"))).toBe("audio/mp4;codecs=mp4a.40.2");
  });
  it("takes Opus in Ogg on Firefox", () => {
    expect(chooseRecordingType(supports("audio/ogg;codecs=opus", "audio/ogg"))).toBe("audio/ogg;codecs=opus");
  });
  it("leaves the choice to the browser when none is said to work, or the question throws", () => {
    expect(chooseRecordingType(supports("audio/x-unknown"))).toBeUndefined();
    expect(
      chooseRecordingType((t) => {
        if (t.startsWith("audio/webm")) throw new Error("not supported");
        return t === "audio/ogg;codecs=opus";
      }),
    ).toBe("audio/ogg;codecs=opus");
  });
  it("every type it may choose is kept by the upload once recorded", () => {
    // The first bytes each container starts with (see tests/storage/sniff.test.ts for real files).
    const heads = {
      webm: Uint8Array.from([0x1a, 0x45, 0xdf, 0xa3, 0x9f, 0x42, 0x82, 0x84, 0x77, 0x65, 0x62, 0x6d]),
      mp4: new TextEncoder().encode("\0\0\0\x1cftypiso5\0\0\x02\0iso5iso6mp41"),
      ogg: new TextEncoder().encode("OggS\0\x02" + "\0".repeat(20) + "\x01\x13OpusHead\x01\x01"),
    };
    expect([heads.webm, heads.mp4, heads.ogg].map((h) => isKeptRecording(sniff(h)))).toEqual([true, true, true]);
  });
});
