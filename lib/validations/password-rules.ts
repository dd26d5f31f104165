// Password rules for new users and resets, after NIST SP 800-63B §5.1.1.2 (memorized secrets):
// a minimum length rather than composition rules, a maximum long enough for pass-phrases, and a
// check against values that are commonly used, repetitive or sequential, or derived from the
// account itself. The list below is a small sample of the most common choices (from published
// breach-corpus rankings, as recalled — not a complete list), plus the trade words a shop would reach for.

export const MIN_PASSWORD_LENGTH = 10;
export const MAX_PASSWORD_LENGTH = 200;

const COMMON = new Set([
  "1234567890", "0123456789", "12345678910", "123456789a", "qwertyuiop", "1q2w3e4r5t", "qwerty1234",
  "password12", "password123", "password1!", "passw0rd12", "iloveyou12", "letmein123", "welcome123",
  "abc1234567", "abcdefghij", "1qaz2wsx3edc", "zaq12wsxcde", "asdfghjkl1", "trustno1234", "football12",
  "baseball12", "superman12", "princess12", "sunshine12", "starwars12", "dragon1234", "monkey1234",
  "changeme12", "changeme123", "administrator", "admin12345", "admin123456",
  // The shop's own words: the first guesses anyone makes at a head shop.
  "grindfade1", "grindfade123", "millrace123", "valvejob123", "cylinderhead", "lapping123", "headshop123",
]);

function isRepetitive(p: string): boolean {
  // One character, or one short block repeated: "aaaaaaaaaa", "abcabcabcabc", "12121212121".
  for (let size = 1; size <= 3; size++) {
    const block = p.slice(0, size);
    if (block.repeat(Math.ceil(p.length / size)).slice(0, p.length) === p) return true;
  }
  return false;
}

function isSequential(p: string): boolean {
  // Every step +1 or every step −1 in character code: "abcdefghijk", "9876543210".
  const codes = [...p.toLowerCase()].map((c) => c.charCodeAt(0));
  const steps = codes.slice(1).map((c, i) => c - codes[i]!);
  return steps.every((s) => s === 1) || steps.every((s) => s === -1);
}

/** Why this password is refused, or null when it passes. `email` and `name` are the account's own. */
export function passwordProblem(password: string, account: { email?: string; name?: string } = {}): string | null {
  if (password.length < MIN_PASSWORD_LENGTH) return `Use at least ${MIN_PASSWORD_LENGTH} characters.`;
  if (password.length > MAX_PASSWORD_LENGTH) return `Use at most ${MAX_PASSWORD_LENGTH} characters.`;
  const lower = password.toLowerCase();
  if (COMMON.has(lower)) return "That password is one of the first anyone would guess. Choose another.";
  if (isRepetitive(password) || isSequential(password)) {
    return "That password is a repeat or a run of characters. Choose something less predictable.";
  }
  const local = account.email?.split("@")[0]?.toLowerCase() ?? "";
  if (local.length >= 3 && lower.includes(local)) return "Do not use the e-mail address in the password.";
  const nameParts = (account.name ?? "").toLowerCase().split(/\s+/).filter((w) => w.length >= 3);
  if (nameParts.some((w) => lower.includes(w))) return "Do not use the person's name in the password.";
  return null;
}
