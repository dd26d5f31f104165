// What "Use a recording" says about a file before decoding it, and after, by size, bytes and length.
import { describe, expect, it } from "vitest";
import { checkTakeFile, checkTakeLength } from "@/lib/bench/take-file";
import { MAX_RECORDING_BYTES } from "@/lib/storage/limits";
import { concat, ebmlHeader, heicHead, jpegHead, oggFlacPage, oggOpusPage, oggVorbisPage, wavFile } from "../storage/fixtures";

const file = (name: string, size = 1000) => ({ name, size });

describe("checkTakeFile", () => {
  it("accepts the recorders' kinds by their bytes, whatever the file is called", () => {
    const m4a = concat([0, 0, 0, 28], "ftypM4A ", [0, 0, 2, 0], "M4A isomiso2");
    expect(checkTakeFile(file("memo.m4a"), m4a)).toMatchObject({ ok: true, sniffed: { kind: "mp4", type: "audio/mp4" } });
    expect(checkTakeFile(file("memo.txt"), wavFile.subarray(0, 64))).toMatchObject({ ok: true, sniffed: { kind: "wav" } });
    expect(checkTakeFile(file("a.ogg"), oggVorbisPage)).toMatchObject({ ok: true, sniffed: { codec: "vorbis" } });
    expect(checkTakeFile(file("a.opus"), oggOpusPage)).toMatchObject({ ok: true });
    expect(checkTakeFile(file("a.webm"), ebmlHeader())).toMatchObject({ ok: true });
    expect(checkTakeFile(file("a.mp3"), Uint8Array.from([0xff, 0xfb, 0x90, 0x64]))).toMatchObject({ ok: true, sniffed: { type: "audio/mpeg" } });
  });

  it("refuses a photo named like a recording, other audio, unknown bytes, an empty or too large file, each saying what to do", () => {
    const refusal = (f: { name: string; size: number }, head: Uint8Array) => {
      const r = checkTakeFile(f, head);
      expect(r.ok).toBe(false);
      return (r as { message: string }).message;
    };
    expect(refusal(file("lapping.m4a"), jpegHead)).toMatch(/“lapping\.m4a” is a photo\. Pick the m4a, MP3, Ogg or WAV file/);
    expect(refusal(file("IMG.m4a"), heicHead)).toMatch(/is a photo/);
    expect(refusal(file("a.ogg"), oggFlacPage)).toMatch(/audio in a form Grindfade does not keep \(Ogg flac\)/);
    expect(refusal(file("a.mkv"), ebmlHeader("matroska"))).toMatch(/does not keep \(matroska\)/);
    expect(refusal(file("notes.wav"), new TextEncoder().encode("just some text"))).toMatch(/not a sound recording Grindfade knows/);
    expect(refusal(file("empty.m4a", 0), new Uint8Array(0))).toMatch(/“empty\.m4a” is empty/);
    expect(refusal(file("long.wav", MAX_RECORDING_BYTES + 1), wavFile)).toMatch(/limited to 64 MB/);
  });
});

describe("checkTakeLength", () => {
  it("wants a few seconds at least and 20 minutes at most", () => {
    expect(checkTakeLength("a.m4a", 60)).toBeNull();
    expect(checkTakeLength("a.m4a", 2)).toMatch(/under 3 seconds/);
    expect(checkTakeLength("a.m4a", 21 * 60)).toMatch(/lasts 21 minutes.*20 minutes at most/);
    expect(checkTakeLength("a.m4a", 0)).toMatch(/could not decode “a\.m4a”/);
    expect(checkTakeLength("a.m4a", Number.NaN)).toMatch(/could not decode/);
  });
});
