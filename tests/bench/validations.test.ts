// The bench's zod schemas and readJson: the edges of a plausible stroke and session start, and
// messages that name the field that is wrong.
import { describe, expect, it } from "vitest";
import { BadRequestError } from "@/lib/errors";
import { readJson } from "@/lib/http";
import { startSessionSchema, strokeBatchSchema, strokeInputSchema } from "@/lib/validations/bench";
import { sessionBody, strokeInputs } from "./helpers";

const stroke = (over: Record<string, unknown> = {}) => ({ ...strokeInputs([4])[0]!, ...over });
const firstPath = (input: unknown) => {
  const r = strokeInputSchema.safeParse(input);
  return r.success ? null : r.error.issues.map((i) => i.path.join("."));
};

describe("strokeInputSchema", () => {
  it("accepts a stroke at the edges of the plausible ranges and defaults its flags", () => {
    const noFlags: Record<string, unknown> = stroke();
    delete noFlags.flags;
    expect(strokeInputSchema.parse(noFlags).flags).toEqual([]);
    // ±60 dB contrast and 0 s start are the schema's own inclusive bounds.
    for (const contrastDb of [-60, 60]) expect(strokeInputSchema.safeParse(stroke({ contrastDb })).success).toBe(true);
    expect(strokeInputSchema.safeParse(stroke({ startS: 0, endS: 0.5 })).success).toBe(true);
  });

  it("refuses each implausible value on its own field", () => {
    expect(firstPath(stroke({ contrastDb: 60.5 }))).toEqual(["contrastDb"]);
    expect(firstPath(stroke({ contrastDb: Number.NaN }))).toEqual(["contrastDb"]);
    expect(firstPath(stroke({ startS: -1, endS: 1 }))).toEqual(["startS"]);
    expect(firstPath(stroke({ startS: 3, endS: 3 }))).toEqual(["endS"]);
    expect(firstPath(stroke({ index: 0 }))).toEqual(["index"]);
    expect(firstPath(stroke({ index: 1.5 }))).toEqual(["index"]);
    expect(firstPath(stroke({ onsetDb: -201 }))).toEqual(["onsetDb"]);
    expect(firstPath(stroke({ bodyDb: "loud" }))).toEqual(["bodyDb"]);
    expect(firstPath(stroke({ clientId: "1234" }))).toEqual(["clientId"]);
    expect(firstPath(stroke({ flags: ["clipping", "too-quiet", "clipping"] }))).toEqual(["flags"]);
    expect(firstPath(stroke({ flags: ["talking"] }))).toEqual(["flags.0"]);
    expect(firstPath(stroke({ bandSnrDb: "clean" }))).toEqual(["bandSnrDb"]);
    expect(firstPath(stroke({ bandSnrDb: 500 }))).toEqual(["bandSnrDb"]);
    expect(strokeInputSchema.parse({ ...strokeInputs([3])[0], bandSnrDb: 12.345678 }).bandSnrDb).toBe(Math.fround(12.345678));
    // Every reason the engine gives is accepted, together.
    expect(strokeInputSchema.safeParse({ ...strokeInputs([3])[0], flags: ["clipping", "too-quiet", "speech", "impulsive", "start-not-heard", "end-not-heard"] }).success).toBe(true);
  });

  it("limits a batch to between 1 and 500 strokes", () => {
    expect(strokeBatchSchema.safeParse({ strokes: [] }).success).toBe(false);
    expect(strokeBatchSchema.safeParse({ strokes: strokeInputs(Array.from({ length: 500 }, () => 3)) }).success).toBe(true);
    expect(strokeBatchSchema.safeParse({ strokes: strokeInputs(Array.from({ length: 501 }, () => 3)) }).success).toBe(false);
  });
});

describe("startSessionSchema", () => {
  it("accepts a session start without the optional measurements", () => {
    const plain: Record<string, unknown> = sessionBody("fine", "phone-1234");
    delete plain.sampleRateHz;
    delete plain.noiseFloorDb;
    expect(startSessionSchema.parse(plain)).toEqual(plain);
  });

  it("refuses a short device id, a sample rate out of range and a noise floor above full scale", () => {
    const paths = (o: Record<string, unknown>) => {
      const r = startSessionSchema.safeParse({ ...sessionBody("coarse", "phone-1234"), ...o });
      return r.success ? [] : r.error.issues.map((i) => i.path.join("."));
    };
    expect(paths({ deviceId: "   abc   " })).toEqual(["deviceId"]);
    expect(paths({ sampleRateHz: 4000 })).toEqual(["sampleRateHz"]);
    expect(paths({ noiseFloorDb: 3 })).toEqual(["noiseFloorDb"]);
  });
});

describe("readJson", () => {
  const req = (body: BodyInit, headers: Record<string, string> = { "content-type": "application/json" }) =>
    new Request("http://grindfade.test/x", { method: "POST", body, headers, duplex: "half" } as RequestInit);

  it("returns the parsed value", async () => {
    const s = stroke();
    // Figures come back as the single-precision columns will hold them.
    const asStored = { ...s, startS: Math.fround(s.startS), endS: Math.fround(s.endS), onsetDb: Math.fround(s.onsetDb), bodyDb: Math.fround(s.bodyDb), contrastDb: Math.fround(s.contrastDb) };
    expect(asStored.endS).not.toBe(s.endS);
    expect(await readJson(req(JSON.stringify({ strokes: [s] })), strokeBatchSchema)).toEqual({ strokes: [asStored] });
  });

  it("names the first field that is wrong and lists every field error", async () => {
    const bad = [stroke(), stroke({ contrastDb: 500, clientId: "x" })];
    const err = await readJson(req(JSON.stringify({ strokes: bad })), strokeBatchSchema).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(BadRequestError);
    const e = err as BadRequestError;
    expect(e.message).toMatch(/^strokes\.1\.(clientId|contrastDb): /);
    expect(Object.keys(e.fieldErrors).sort()).toEqual(["strokes.1.clientId", "strokes.1.contrastDb"]);
  });

  it("says so when the body is not JSON", async () => {
    await expect(readJson(req("strokes=1"), strokeBatchSchema)).rejects.toThrow("The request body must be JSON.");
    await expect(readJson(req(""), strokeBatchSchema)).rejects.toThrow("The request body must be JSON.");
    await expect(readJson(req(Uint8Array.from([0x7b, 0xff, 0x7d])), strokeBatchSchema)).rejects.toThrow("The request body must be JSON in UTF-8.");
  });

  it("takes application/json and structured +json types, with parameters, and refuses others with 415", async () => {
    const body = JSON.stringify({ strokes: [stroke()] });
    for (const type of ["application/json", "Application/JSON; charset=utf-8", "application/merge-patch+json"]) {
      await expect(readJson(req(body, { "content-type": type }), strokeBatchSchema)).resolves.toBeTruthy();
    }
    for (const headers of [{ "content-type": "text/plain;charset=UTF-8" }, { "content-type": "application/jsonp" }, {}] as Array<Record<string, string>>) {
      const err = await readJson(req(Buffer.from(body), headers), strokeBatchSchema).catch((e: unknown) => e);
      expect(err).toMatchObject({ status: 415, message: "Send the body as JSON, with Content-Type: application/json." });
    }
  });

  it("refuses a body over the limit with 413, whether declared or only sent", async () => {
    const body = JSON.stringify({ strokes: [stroke({ pad: "x".repeat(200) })] });
    // Exactly at the limit is read; one byte over is not.
    await expect(readJson(req(body), strokeBatchSchema, body.length)).resolves.toBeTruthy();
    const over = await readJson(req(body), strokeBatchSchema, body.length - 1).catch((e: unknown) => e);
    expect(over).toMatchObject({ status: 413 });
    const declared = await readJson(req(body, { "content-type": "application/json", "content-length": "2000000" }), strokeBatchSchema).catch((e: unknown) => e);
    expect(declared).toMatchObject({ status: 413, message: "The request body is larger than 1 MB. Send it in smaller parts." });
    // A stream that never ends is cut off at the limit instead of being buffered.
    let pulled = 0;
    const endless = new ReadableStream<Uint8Array>({
      pull(c) {
        pulled += 65536;
        c.enqueue(new Uint8Array(65536).fill(0x20));
      },
    });
    expect(await readJson(req(endless), strokeBatchSchema).catch((e: unknown) => e)).toMatchObject({ status: 413 });
    expect(pulled).toBeLessThan(2 * 1024 * 1024);
  });
});
