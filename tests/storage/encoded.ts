// Real compressed recordings, made at test time by Debian's ffmpeg from a WAV: the kinds phones
// record and keep. Each entry names the ffmpeg arguments that make it, so a failure can be
// reproduced by hand.
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";

export type EncodedKind =
  "webkit-mp4" | "m4a" | "webm-opus" | "ogg-opus" | "ogg-vorbis" | "mp3" | "mp3-bare";

/** ffmpeg output arguments per kind, and the extension of the file. */
export const ENCODINGS: Record<EncodedKind, { ext: string; args: string[]; what: string }> = {
  // Safari's MediaRecorder writes a fragmented MP4 (an empty moov, then moof/mdat fragments) of AAC.
  "webkit-mp4": {
    ext: "mp4",
    args: [
      "-c:a",
      "aac",
      "-b:a",
      "64k",
      "-movflags",
      "+frag_keyframe+empty_moov+default_base_moof",
      "-f",
      "mp4",
    ],
    what: "fragmented MP4 with AAC, as Safari's MediaRecorder writes it",
  },
  // An iPhone's voice memo or an Android recorder's m4a: AAC in an "M4A " file.
  m4a: {
    ext: "m4a",
    args: ["-c:a", "aac", "-b:a", "96k", "-f", "ipod"],
    what: "M4A with AAC, as phone recorder apps write it",
  },
  "webm-opus": {
    ext: "webm",
    args: ["-c:a", "libopus", "-b:a", "48k", "-f", "webm"],
    what: "WebM with Opus (Chrome, Android)",
  },
  "ogg-opus": {
    ext: "ogg",
    args: ["-c:a", "libopus", "-b:a", "48k", "-f", "ogg"],
    what: "Ogg with Opus (Firefox)",
  },
  "ogg-vorbis": {
    ext: "ogg",
    args: ["-c:a", "libvorbis", "-q:a", "4", "-f", "ogg"],
    what: "Ogg with Vorbis (recorder apps)",
  },
  mp3: {
    ext: "mp3",
    args: ["-c:a", "libmp3lame", "-b:a", "128k", "-f", "mp3"],
    what: "MP3 with an ID3v2 tag",
  },
  "mp3-bare": {
    ext: "mp3",
    args: [
      "-c:a",
      "libmp3lame",
      "-b:a",
      "128k",
      "-id3v2_version",
      "0",
      "-write_xing",
      "0",
      "-f",
      "mp3",
    ],
    what: "MP3 starting straight with a frame header (no tag)",
  },
};

/** Encodes `wavPath` as `kind` into `dir`; returns the new file's path. */
export function encodeWith(
  kind: EncodedKind,
  wavPath: string,
  dir: string = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-enc-")),
): string {
  const { ext, args } = ENCODINGS[kind];
  const out = path.join(dir, `${path.basename(wavPath, ".wav")}-${kind}.${ext}`);
  execFileSync(
    "ffmpeg",
    ["-hide_banner", "-loglevel", "error", "-y", "-i", wavPath, ...args, out],
    { stdio: ["ignore", "ignore", "pipe"] },
  );
  return out;
}
