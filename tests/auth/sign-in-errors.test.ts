// The sign-in page's messages: our own sentence for each refusal code, a plain sentence of ours
// for anything else in the address, never the address's own text.
import { describe, expect, it } from "vitest";
import { lockedMessage, signInErrorMessage, signInRefusal, throttledMessage } from "@/lib/auth/sign-in-errors";

describe("signInErrorMessage", () => {
  it("turns each code the credential check refuses with into its sentence", () => {
    expect(signInErrorMessage(signInRefusal.invalid)).toBe("Wrong e-mail or password.");
    expect(signInErrorMessage("CredentialsSignin")).toBe("Wrong e-mail or password.");
    expect(signInErrorMessage(signInRefusal.badInput)).toMatch(/Enter your e-mail address and password/);
    expect(signInErrorMessage(signInRefusal.locked(5))).toBe(lockedMessage(5));
    expect(signInErrorMessage(signInRefusal.throttled(1))).toBe(throttledMessage(1));
    expect(signInErrorMessage(null)).toBeNull();
    expect(signInErrorMessage("")).toBeNull();
  });

  it("never shows text from the address", () => {
    const planted = [
      "Your account is suspended. Call 0800 000 000 to restore it",
      "<script>alert(1)</script>",
      "locked:5 — call us",
      "throttled:99999",
      "toString",
      "__proto__",
      "constructor",
    ];
    for (const code of planted) {
      const message = signInErrorMessage(code);
      expect(message, code).toBe("Sign-in did not work. Try again, or ask an admin if it keeps happening.");
    }
  });
});
