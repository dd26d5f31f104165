// What a refused sign-in is called between the server and the sign-in page. The server names the
// reason with a short code (the page's address carries it, where anyone can write anything), and
// the page shows our own sentence for a code it knows, never text taken from the address.

/** The codes the credential check refuses with; minutes ride along where the person must wait. */
export const signInRefusal = {
  invalid: "invalid",
  badInput: "bad-input",
  locked: (minutes: number) => `locked:${minutes}`,
  throttled: (minutes: number) => `throttled:${minutes}`,
} as const;

export function lockedMessage(minutes: number): string {
  return (
    `Too many wrong passwords: this account is locked for ${minutes} more minute` +
    `${minutes === 1 ? "" : "s"}. Wait, or ask an admin to reset the password.`
  );
}

export function throttledMessage(minutes: number): string {
  return (
    `Too many wrong sign-ins from this device: wait ${minutes} minute${minutes === 1 ? "" : "s"} ` +
    "before trying again, or ask an admin to reset the password."
  );
}

const WRONG = "Wrong e-mail or password.";

/** next-auth's own codes (its error page's list) and ours. */
const FIXED: Record<string, string> = {
  invalid: WRONG,
  CredentialsSignin: WRONG,
  "bad-input": "Enter your e-mail address and password.",
  SessionRequired: "Sign in to continue.",
  AccessDenied: "This account cannot sign in. Ask an admin.",
};

/** The sentence for a refusal code, or null for none; an unknown code gets a plain sentence of ours. */
export function signInErrorMessage(code: string | null | undefined): string | null {
  if (!code) return null;
  if (Object.hasOwn(FIXED, code)) return FIXED[code]!;
  const wait = /^(locked|throttled):(\d{1,4})$/.exec(code);
  if (wait) {
    const minutes = Math.max(1, Number(wait[2]));
    return wait[1] === "locked" ? lockedMessage(minutes) : throttledMessage(minutes);
  }
  return "Sign-in did not work. Try again, or ask an admin if it keeps happening.";
}
