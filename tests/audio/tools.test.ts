import { describe, expect, it } from "vitest";
import { hasTool } from "./helpers";

// In CI the reference tools are part of the contract: their absence is a
// failure here, not a silent skip elsewhere.
describe.runIf(process.env.CI)("reference tools in CI", () => {
  it.each(["sox", "aubioonset", "espeak-ng", "ffmpeg"] as const)("%s is installed", (tool) => {
    expect(hasTool(tool)).toBe(true);
  });
});
