// Reads a PDF back page by page with Debian's poppler-utils (pdfinfo, pdftotext), as a person
// holding the printout would: the text of each page, and how far down each page its body runs.
import { execFileSync } from "node:child_process";

export interface PdfPage {
  /** The page's text laid out as printed (`pdftotext -layout`). */
  text: string;
  /**
   * How much of the page's body (between the top and bottom margins) its content fills, from the
   * top margin to the lowest word above the bottom margin (`pdftotext -bbox`), 0 to 1.
   */
  fill: number;
}

const run = (cmd: string, args: string[]) => execFileSync(cmd, args, { encoding: "utf8", maxBuffer: 64 * 1024 * 1024 });

export function pdfPageCount(file: string): number {
  const m = /^Pages:\s+(\d+)$/m.exec(run("pdfinfo", [file]));
  if (!m) throw new Error(`pdfinfo found no page count in ${file}`);
  return Number(m[1]);
}

/** Every page of the PDF; margins in points (1 mm = 72/25.4 pt). */
export function pdfPages(file: string, margins: { topPt: number; bottomPt: number }): PdfPage[] {
  const count = pdfPageCount(file);
  const pages: PdfPage[] = [];
  for (let n = 1; n <= count; n++) {
    const text = run("pdftotext", ["-f", String(n), "-l", String(n), "-layout", file, "-"]);
    const bbox = run("pdftotext", ["-f", String(n), "-l", String(n), "-bbox", file, "-"]);
    const height = Number(/<page width="[\d.]+" height="([\d.]+)"/.exec(bbox)![1]);
    const bodyBottom = height - margins.bottomPt;
    let lowest = margins.topPt;
    for (const m of bbox.matchAll(/<word xMin="[\d.]+" yMin="([\d.]+)" xMax="[\d.]+" yMax="([\d.]+)">/g)) {
      const [yMin, yMax] = [Number(m[1]), Number(m[2])];
      if (yMin < bodyBottom) lowest = Math.max(lowest, Math.min(yMax, bodyBottom));
    }
    pages.push({ text, fill: (lowest - margins.topPt) / (bodyBottom - margins.topPt) });
  }
  return pages;
}

export const MM = 72 / 25.4;
