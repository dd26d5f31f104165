// The production server's own bundle, Next.js's bundle and the database thread each hold a copy of
// lib/errors.ts. An error made by one copy must be answered by another with its own status, as a
// refusal from the database thread is by the server's stroke path. Two fresh copies of the module
// stand in for two bundles here.
import { describe, expect, it, vi } from "vitest";

describe("our errors across copies of their module", () => {
  it("are recognised by class, and only by their own class and those above it", async () => {
    const one = await import("@/lib/errors");
    vi.resetModules();
    const two = await import("@/lib/errors");
    expect(two.NotFoundError).not.toBe(one.NotFoundError);

    const missing = new one.NotFoundError("No such session.");
    expect(missing instanceof two.NotFoundError).toBe(true);
    expect(missing instanceof two.AppError).toBe(true);
    expect(missing instanceof two.ForbiddenError).toBe(false);
    expect(missing instanceof two.BadRequestError).toBe(false);
    expect(two.errorAnswer(missing)).toEqual({ status: 404, body: { error: "not_found", message: "No such session." } });

    const bad = new one.BadRequestError("strokes: Too many", { strokes: ["Too many"] });
    expect(two.errorAnswer(bad)).toEqual({ status: 400, body: { error: "bad_request", message: "strokes: Too many", fieldErrors: { strokes: ["Too many"] } } });
    const stopping = new one.DatabaseStoppingError();
    expect(stopping instanceof two.DatabaseStoppingError).toBe(true);
    expect(stopping instanceof two.DatabaseStartError).toBe(false);
    expect(two.errorAnswer(stopping).status).toBe(503);
  });

  it("does not take anything else for one of ours", async () => {
    const { AppError, NotFoundError, errorAnswer } = await import("@/lib/errors");
    const lookalike = Object.assign(new Error("x"), { status: 404, name: "NotFoundError" });
    expect(lookalike instanceof NotFoundError).toBe(false);
    expect(lookalike instanceof AppError).toBe(false);
    for (const value of [null, undefined, 404, "NotFoundError", {}]) expect(value instanceof AppError).toBe(false);
    const spy = vi.spyOn(console, "error").mockImplementation(() => {});
    expect(errorAnswer(lookalike).status).toBe(500);
    spy.mockRestore();
  });
});
