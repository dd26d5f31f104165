// The report's footer is the shop's own words placed in a CSS string: whatever the admin types,
// it stays one string and can never close the <style> element it sits in.
import { describe, expect, it } from "vitest";
import { cssString, reportPrintCss } from "@/components/report/print-css";

describe("the report's print styles", () => {
  it("quote the footer as one CSS string, escaping quotes, backslashes, line ends and '<'", () => {
    expect(cssString("Millrace Head Works · head report MHW-0141")).toBe('"Millrace Head Works · head report MHW-0141"');
    const nasty = 'Bo\'s "Heads" \\ Co.\n</style><script>alert(1)</script>';
    const quoted = cssString(nasty);
    expect(quoted).not.toContain("<");
    expect(quoted).not.toContain("\n");
    // Inside the outer quotes every double quote is escaped.
    expect(quoted.slice(1, -1)).not.toMatch(/(^|[^\\])"/);
    expect(quoted).toBe('"Bo\'s \\"Heads\\" \\\\ Co.\\A \\3C /style>\\3C script>alert(1)\\3C /script>"');
  });

  it("number every page and keep headings with what follows, with no paper size forced", () => {
    const css = reportPrintCss("Shop · head report MHW-0001");
    expect(css).toContain('content: "Page " counter(page) " of " counter(pages)');
    expect(css).toMatch(/h2, \.report h3, \.report caption[^{]*\{ break-after: avoid/);
    expect(css).not.toMatch(/size:\s*(A4|letter)/i);
  });
});
