// The analyzer's output as the command line (and any other tool) sees it:
// the JSON report of a recording, and a plain-text table for people.

import type { AnalysisResult, RecordingWarning } from "./analyzer";
import { FLAG_TEXT, WARNING_TEXT } from "./analyzer";
import { leftOutSummary, type StrokeFlag } from "./verdict";

export interface ReportStroke {
  index: number;
  startS: number;
  endS: number;
  onsetDb: number;
  bodyDb: number;
  contrastDb: number;
  /** Grind-band body over the grind-band noise floor, dB. */
  bandSnrDb: number;
  /** Why the stroke was left out of the verdict; empty when it was judged. */
  flags: StrokeFlag[];
  /** One phrase per flag, in the same order. */
  reasons: string[];
}

export interface AnalysisReport {
  sampleRate: number;
  durationS: number;
  /** Noise floors per band, dBFS: level band, grind band, voice band. */
  noiseFloors: { levelDbfs: number; grindDbfs: number; voiceDbfs: number };
  strokes: ReportStroke[];
  /** Strokes left out of the verdict, and how many carried each flag. */
  leftOut: { strokes: number; byFlag: Partial<Record<string, number>> };
  fit: { floorDb: number | null; strokesRemaining: number | null };
  settled: {
    atStroke: number;
    atS: number | null;
    rule: { consecutive: number; maxContrastDb: number; maxSlopeDbPerStroke: number };
  } | null;
  notSettling: boolean;
  warnings: RecordingWarning[];
}

const round = (x: number, digits: number) => {
  const f = 10 ** digits;
  return Math.round(x * f) / f;
};

export function toReport(result: AnalysisResult): AnalysisReport {
  const v = result.verdict;
  return {
    sampleRate: result.sampleRate,
    durationS: round(result.durationS, 3),
    noiseFloors: {
      levelDbfs: round(result.noiseFloors.levelDbfs, 2),
      grindDbfs: round(result.noiseFloors.grindDbfs, 2),
      voiceDbfs: round(result.noiseFloors.voiceDbfs, 2),
    },
    strokes: result.strokes.map((s) => ({
      index: s.index,
      startS: round(s.startS, 3),
      endS: round(s.endS, 3),
      onsetDb: round(s.onsetDb, 2),
      bodyDb: round(s.bodyDb, 2),
      contrastDb: round(s.contrastDb, 2),
      bandSnrDb: round(s.bandSnrDb, 2),
      flags: [...s.flags],
      reasons: s.flags.map((f) => FLAG_TEXT[f]),
    })),
    leftOut: { strokes: v.leftOutStrokes, byFlag: { ...v.leftOutByFlag } },
    fit: { floorDb: v.fit ? round(v.fit.floorDb, 2) : null, strokesRemaining: v.strokesRemaining },
    settled: v.settled
      ? { atStroke: v.settled.atStroke, atS: v.settled.atS === null ? null : round(v.settled.atS, 3), rule: { ...v.rule } }
      : null,
    notSettling: v.notSettling,
    warnings: [...result.warnings],
  };
}

const pad = (s: string, n: number) => s.padStart(n);

export function formatReportText(result: AnalysisResult, label: string): string {
  const lines: string[] = [];
  const v = result.verdict;
  lines.push(
    `${label}: ${result.durationS.toFixed(1)} s at ${result.sampleRate} Hz, room noise ${result.noiseFloorDbfs.toFixed(1)} dBFS (grind band ${result.noiseFloors.grindDbfs.toFixed(1)}, voice band ${result.noiseFloors.voiceDbfs.toFixed(1)}), high band ${result.highBandHz[0]}–${Math.round(result.highBandHz[1])} Hz`,
  );
  lines.push("");
  lines.push(`${pad("#", 4)} ${pad("start s", 8)} ${pad("end s", 8)} ${pad("onset dB", 9)} ${pad("body dB", 8)} ${pad("contrast", 9)} ${pad("SNR dB", 7)}  left out because`);
  for (const s of result.strokes) {
    lines.push(
      `${pad(String(s.index), 4)} ${pad(s.startS.toFixed(3), 8)} ${pad(s.endS.toFixed(3), 8)} ${pad(s.onsetDb.toFixed(1), 9)} ${pad(s.bodyDb.toFixed(1), 8)} ${pad(s.contrastDb.toFixed(1), 9)} ${pad(s.bandSnrDb.toFixed(1), 7)}  ${s.flags.map((f) => FLAG_TEXT[f]).join("; ")}`,
    );
  }
  if (result.strokes.length === 0) lines.push("   (no strokes)");
  lines.push("");
  if (v.fit) {
    lines.push(
      `Fade fit: floor ${v.fit.floorDb.toFixed(1)} dB, decay ${v.fit.decayStrokes.toFixed(1)} strokes, residual ${v.fit.rmsErrorDb.toFixed(2)} dB`,
    );
  }
  const r = v.rule;
  const ruleText = `last ${r.consecutive} strokes ≤ ${r.maxContrastDb} dB with slope within ±${r.maxSlopeDbPerStroke} dB/stroke`;
  if (v.settled) {
    const at = v.settled.atS === null ? "" : ` (${v.settled.atS.toFixed(1)} s)`;
    lines.push(`Verdict: SETTLED at stroke ${v.settled.atStroke}${at} — ${ruleText}.`);
  } else if (v.notSettling) {
    lines.push(
      "Verdict: NOT SETTLING — the contrast has flattened above the threshold. More lapping will not help; check the seat and valve face, they may need recutting.",
    );
  } else if (v.judgedStrokes === 0) {
    lines.push(result.strokes.length === 0 ? "Verdict: no strokes to judge." : "Verdict: none of the strokes could be judged.");
  } else {
    const rem = v.strokesRemaining === null ? "not yet steady" : `about ${v.strokesRemaining}`;
    lines.push(`Verdict: still fading — strokes remaining ${rem} (rule: ${ruleText}).`);
  }
  const leftOut = leftOutSummary(v);
  if (leftOut) lines.push(`${leftOut} (kept above, not judged).`);
  for (const w of result.warnings) lines.push(`Warning: ${WARNING_TEXT[w]}`);
  return lines.join("\n") + "\n";
}
