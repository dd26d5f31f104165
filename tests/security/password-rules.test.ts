// Password rules after NIST SP 800-63B §5.1.1.2: length limits, no commonly used, repetitive or
// sequential values, nothing taken from the account itself — and no composition rules.
import { describe, expect, it } from "vitest";
import { passwordProblem } from "@/lib/validations/password-rules";
import { createUserSchema, resetPasswordSchema } from "@/lib/validations/users";

describe("password rules", () => {
  it("takes a long pass-phrase without demanding digits or symbols", () => {
    expect(passwordProblem("brass shim under the cam cap")).toBeNull();
    expect(passwordProblem("quietseatsnoisycams")).toBeNull();
  });

  it("refuses short and overlong passwords", () => {
    expect(passwordProblem("short1!")).toMatch(/at least 10/);
    expect(passwordProblem("x".repeat(9) + "y".repeat(192))).toMatch(/at most 200/);
  });

  it("refuses common, repeated and sequential ones", () => {
    for (const p of ["password123", "Password123", "1234567890", "qwertyuiop", "grindfade123"]) {
      expect(passwordProblem(p), p).toMatch(/first anyone would guess/);
    }
    for (const p of ["aaaaaaaaaaaa", "abcabcabcabc", "1212121212", "abcdefghijklm", "9876543210"]) {
      expect(passwordProblem(p), p).toMatch(/repeat or a run/);
    }
  });

  it("refuses a password built on the person's e-mail or name", () => {
    expect(passwordProblem("tomas-the-fitter", { email: "tomas@shop.example" })).toMatch(/e-mail/);
    expect(passwordProblem("ValerieRocks2026", { name: "Valerie Okon" })).toMatch(/name/);
    // Short name parts are too common to forbid.
    expect(passwordProblem("we lap by ear", { name: "Al Wu" })).toBeNull();
  });

  it("applies the account rules when a person is added, with the message on the password field", () => {
    const res = createUserSchema.safeParse({ name: "Marta Quill", email: "marta@shop.example", role: "technician", password: "marta-laps-valves" });
    expect(res.success).toBe(false);
    if (!res.success) {
      expect(res.error.issues).toHaveLength(1);
      expect(res.error.issues[0]!.path).toEqual(["password"]);
      expect(res.error.issues[0]!.message).toMatch(/e-mail/);
    }
    expect(
      createUserSchema.safeParse({ name: "Marta Quill", email: "marta@shop.example", role: "technician", password: "seats before cams" }).success,
    ).toBe(true);
  });

  it("applies the plain rules on a reset", () => {
    const res = resetPasswordSchema.safeParse({ id: crypto.randomUUID(), password: "1234567890" });
    expect(res.success).toBe(false);
  });
});
