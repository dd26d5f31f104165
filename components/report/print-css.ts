// The head report on paper. No paper size is set: A4 and US Letter both take the printer's own,
// and the margins hold the running footer (Chromium draws CSS Paged Media margin boxes,
// https://www.w3.org/TR/css-page-3/#margin-boxes). Pages break between small pieces (a table row,
// a card, a signature) rather than before whole sections, so no section leaves a page nearly
// empty; headings and captions stay with what follows them.

/** A CSS string literal for `content:` — quotes, backslashes, line ends and "<" escaped. */
export function cssString(text: string): string {
  return `"${text.replace(/\\/g, "\\\\").replace(/"/g, '\\"').replace(/\r?\n/g, "\\A ").replace(/</g, "\\3C ")}"`;
}

/** The paper margins, in millimetres; the bottom one holds the footer and the page numbers. */
export const REPORT_MARGINS_MM = { top: 14, right: 13, bottom: 16, left: 13 } as const;

export function reportPrintCss(footer: string): string {
  const m = REPORT_MARGINS_MM;
  return `
@page {
  margin: ${m.top}mm ${m.right}mm ${m.bottom}mm ${m.left}mm;
  @bottom-left { content: ${cssString(footer)}; font: 8pt system-ui, sans-serif; color: #57534e; }
  @bottom-right { content: "Page " counter(page) " of " counter(pages); font: 8pt system-ui, sans-serif; color: #1c1917; }
}
@media print {
  html, body { background: white !important; }
  main { max-width: none !important; padding: 0 !important; margin: 0 !important; }
  a { color: inherit !important; text-decoration: none !important; }
  .report h2, .report h3, .report caption, .report .keep-with-next { break-after: avoid; page-break-after: avoid; }
  .report thead { display: table-header-group; }
  .report tr, .report li, .report .keep-whole { break-inside: avoid; page-break-inside: avoid; }
  .report p { orphans: 3; widows: 3; }
  /* The seat map is drawn to the screen's width; on paper it keeps its shape at a height that leaves room around it. */
  .report [data-testid="seat-map"] { height: 105mm !important; width: auto !important; min-width: 0 !important; max-width: 100% !important; }
}
`;
}
