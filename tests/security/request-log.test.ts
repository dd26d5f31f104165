// The log an operator reads: one JSON line per event with the request's id on every line of the
// request; a refusal is one line without a stack, a server error logs its stack once with the id
// that its 500 answer also carries.
import { describe, expect, it, vi } from "vitest";
import { ConflictError, errorAnswer } from "@/lib/errors";
import { log, makeLogger, requestContext, requestIdFrom, routeConsoleToLog } from "@/lib/log";

describe("request log", () => {
  it("puts the request's id on every line logged while it is answered", () => {
    const lines: string[] = [];
    const logger = makeLogger("info", { write: (line: string) => void lines.push(line) });
    requestContext.run({ requestId: "11111111-2222-3333-4444-555555555555" }, () => {
      logger.info("first");
      logger.warn({ extra: 1 }, "second");
    });
    logger.info("outside");
    const parsed = lines.map((l) => JSON.parse(l) as Record<string, unknown>);
    expect(parsed.map((p) => [p.msg, p.requestId])).toEqual([
      ["first", "11111111-2222-3333-4444-555555555555"],
      ["second", "11111111-2222-3333-4444-555555555555"],
      ["outside", undefined],
    ]);
    expect(parsed[0]).toMatchObject({ level: 30, time: expect.stringMatching(/^\d{4}-\d{2}-\d{2}T/) });
  });

  it("answers a server error with the id its one stack-carrying line has", () => {
    const error = vi.spyOn(log, "error").mockImplementation(() => undefined);
    const info = vi.spyOn(log, "info").mockImplementation(() => undefined);
    try {
      const boom = new TypeError("cannot read properties of undefined");
      const answer = requestContext.run({ requestId: "aaaaaaaa-bbbb-cccc-dddd-eeeeeeeeeeee" }, () => errorAnswer(boom));
      expect(answer.status).toBe(500);
      expect(answer.body).toMatchObject({ error: "internal", requestId: "aaaaaaaa-bbbb-cccc-dddd-eeeeeeeeeeee", message: expect.stringContaining("aaaaaaaa-bbbb-cccc-dddd-eeeeeeeeeeee") });
      expect(answer.body.message).not.toMatch(/cannot read/);
      expect(error).toHaveBeenCalledTimes(1);
      expect(error.mock.calls[0]![0]).toEqual({ requestId: "aaaaaaaa-bbbb-cccc-dddd-eeeeeeeeeeee", err: boom });
      expect(info).not.toHaveBeenCalled();

      // A refusal: one line, no error object (so no stack), and no id in its answer.
      const refused = errorAnswer(new ConflictError("Seat 3I1 is signed off."), "ffffffff-bbbb-cccc-dddd-eeeeeeeeeeee");
      expect(refused).toEqual({ status: 409, body: { error: "conflict", message: "Seat 3I1 is signed off." } });
      expect(error).toHaveBeenCalledTimes(1);
      expect(info).toHaveBeenCalledTimes(1);
      expect(info.mock.calls[0]![0]).toEqual({ requestId: "ffffffff-bbbb-cccc-dddd-eeeeeeeeeeee", status: 409, error: "conflict" });
    } finally {
      error.mockRestore();
      info.mockRestore();
    }
  });

  it("turns what the framework writes to the console into log lines with the request's id, an error's stack once", () => {
    const lines: string[] = [];
    const logger = makeLogger("debug", { write: (line: string) => void lines.push(line) });
    const restore = routeConsoleToLog(logger);
    const boom = new Error("render failed");
    try {
      requestContext.run({ requestId: "99999999-2222-3333-4444-555555555555" }, () => {
        console.error(" ⨯", boom);
        console.warn("slow %s", "page", 12);
      });
      console.log("ready on", 3000);
    } finally {
      restore();
    }
    // The console is the console again.
    console.log("not captured");
    const parsed = lines.map((l) => JSON.parse(l) as { level: number; msg: string; requestId?: string; err?: { message: string; stack: string } });
    expect(parsed.map((p) => [p.level, p.msg, p.requestId])).toEqual([
      [50, "⨯", "99999999-2222-3333-4444-555555555555"],
      [40, "slow page 12", "99999999-2222-3333-4444-555555555555"],
      [30, "ready on 3000", undefined],
    ]);
    expect(parsed[0]!.err).toMatchObject({ message: "render failed", stack: expect.stringContaining("request-log.test.ts") });
    expect(lines.filter((l) => l.includes("at ")).length).toBe(1);
  });

  it("takes only ids of its own making from a header", () => {
    expect(requestIdFrom("aaaaaaaa-bbbb-cccc-dddd-eeeeeeeeeeee")).toBe("aaaaaaaa-bbbb-cccc-dddd-eeeeeeeeeeee");
    for (const bad of ["x\n{\"forged\":1}", "", null, undefined, "A".repeat(36)]) expect(requestIdFrom(bad)).toBeUndefined();
  });
});
