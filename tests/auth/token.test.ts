// The production server's stroke path reads who is signed in from the session cookie itself
// (lib/auth/token.ts), with the key derived once. These tokens are written by next-auth's own
// encode, so the check is against what next-auth produces, not against our own writer.
import { afterEach, describe, expect, it, vi } from "vitest";
import { encode } from "next-auth/jwt";
import { tokenUser } from "@/lib/auth/token";

const SECRET = "token-test-secret-0123456789abcdef";

function requestWith(cookie: string | null, url = "http://grindfade.test/api/sessions/x/strokes"): Headers {
  return new Request(url, { method: "POST", headers: cookie ? { cookie } : {} }).headers;
}

const savedUrl = process.env.NEXTAUTH_URL;
const savedSecret = process.env.NEXTAUTH_SECRET;
afterEach(() => {
  vi.useRealTimers();
  process.env.NEXTAUTH_URL = savedUrl;
  process.env.NEXTAUTH_SECRET = savedSecret;
});

describe("the session token on a plain request", () => {
  it("gives the id and role next-auth wrote", async () => {
    process.env.NEXTAUTH_SECRET = SECRET;
    process.env.NEXTAUTH_URL = "http://grindfade.test";
    const jwt = await encode({ token: { uid: "user-1", role: "technician" }, secret: SECRET });
    expect(await tokenUser(requestWith(`other=1; next-auth.session-token=${jwt}; theme=dark`))).toEqual({ id: "user-1", role: "technician", sv: 0 });
    // The session version rides along; a token from before versions counts as 0 (above).
    const versioned = await encode({ token: { uid: "user-1", role: "technician", sv: 5 }, secret: SECRET });
    expect(await tokenUser(requestWith(`next-auth.session-token=${versioned}`))).toEqual({ id: "user-1", role: "technician", sv: 5 });
  });

  it("reads a token split over several cookies, as next-auth writes a long one", async () => {
    process.env.NEXTAUTH_SECRET = SECRET;
    process.env.NEXTAUTH_URL = "http://grindfade.test";
    const jwt = await encode({ token: { uid: "user-2", role: "supervisor" }, secret: SECRET });
    const half = Math.floor(jwt.length / 2);
    const cookie = `next-auth.session-token.1=${jwt.slice(half)}; next-auth.session-token.0=${jwt.slice(0, half)}`;
    expect(await tokenUser(requestWith(cookie))).toEqual({ id: "user-2", role: "supervisor", sv: 0 });
  });

  it("uses the __Secure- cookie behind https, and ignores the plain one there", async () => {
    process.env.NEXTAUTH_SECRET = SECRET;
    process.env.NEXTAUTH_URL = "https://grindfade.test";
    const jwt = await encode({ token: { uid: "user-3", role: "admin" }, secret: SECRET });
    expect(await tokenUser(requestWith(`__Secure-next-auth.session-token=${jwt}`))).toEqual({ id: "user-3", role: "admin", sv: 0 });
    expect(await tokenUser(requestWith(`next-auth.session-token=${jwt}`))).toBeNull();
  });

  it("refuses a token made with another secret, an expired one, a tampered one, and none at all", async () => {
    process.env.NEXTAUTH_SECRET = SECRET;
    process.env.NEXTAUTH_URL = "http://grindfade.test";
    const foreign = await encode({ token: { uid: "user-4", role: "technician" }, secret: "some-other-secret-entirely-000000" });
    // next-auth allows 15 s of clock difference; this one ran out a minute ago.
    const expired = await encode({ token: { uid: "user-4", role: "technician" }, secret: SECRET, maxAge: -60 });
    const good = await encode({ token: { uid: "user-4", role: "technician" }, secret: SECRET });
    const tampered = good.slice(0, -6) + (good.endsWith("AAAAAA") ? "BBBBBB" : "AAAAAA");
    expect(await tokenUser(requestWith(`next-auth.session-token=${foreign}`))).toBeNull();
    expect(await tokenUser(requestWith(`next-auth.session-token=${expired}`))).toBeNull();
    expect(await tokenUser(requestWith(`next-auth.session-token=${tampered}`))).toBeNull();
    expect(await tokenUser(requestWith(null))).toBeNull();
    expect(await tokenUser(requestWith("next-auth.session-token=%E0%A4%A"))).toBeNull();
    // The same secret still reads a good token after the failures (the cached key is not spoiled).
    expect(await tokenUser(requestWith(`next-auth.session-token=${good}`))).toEqual({ id: "user-4", role: "technician", sv: 0 });
  });

  it("follows a change of secret", async () => {
    process.env.NEXTAUTH_URL = "http://grindfade.test";
    process.env.NEXTAUTH_SECRET = SECRET;
    const jwt = await encode({ token: { uid: "user-5", role: "technician" }, secret: SECRET });
    expect(await tokenUser(requestWith(`next-auth.session-token=${jwt}`))).not.toBeNull();
    process.env.NEXTAUTH_SECRET = "a-rotated-secret-9876543210fedcba";
    expect(await tokenUser(requestWith(`next-auth.session-token=${jwt}`))).toBeNull();
  });

  it("reads Node's own request headers as the production server passes them", async () => {
    process.env.NEXTAUTH_SECRET = SECRET;
    process.env.NEXTAUTH_URL = "http://grindfade.test";
    const jwt = await encode({ token: { uid: "user-6", role: "technician" }, secret: SECRET });
    expect(await tokenUser({ cookie: `a=b; next-auth.session-token=${jwt}`, host: "grindfade.test" })).toEqual({ id: "user-6", role: "technician", sv: 0 });
    expect(await tokenUser({ host: "grindfade.test" })).toBeNull();
    // A bearer token, as next-auth's getToken reads it when there is no cookie.
    expect(await tokenUser({ authorization: `Bearer ${encodeURIComponent(jwt)}` })).toEqual({ id: "user-6", role: "technician", sv: 0 });
  });

  it("stops answering for a token it has read once as soon as that token expires", async () => {
    process.env.NEXTAUTH_SECRET = SECRET;
    process.env.NEXTAUTH_URL = "http://grindfade.test";
    vi.useFakeTimers({ toFake: ["Date"] });
    vi.setSystemTime(new Date("2026-12-02T08:00:00Z"));
    const jwt = await encode({ token: { uid: "user-7", role: "technician" }, secret: SECRET, maxAge: 3600 });
    expect(await tokenUser(requestWith(`next-auth.session-token=${jwt}`))).toEqual({ id: "user-7", role: "technician", sv: 0 });
    // Within next-auth's 15 s of clock tolerance past the expiry: still good.
    vi.setSystemTime(new Date("2026-12-02T09:00:10Z"));
    expect(await tokenUser(requestWith(`next-auth.session-token=${jwt}`))).toEqual({ id: "user-7", role: "technician", sv: 0 });
    vi.setSystemTime(new Date("2026-12-02T09:00:20Z"));
    expect(await tokenUser(requestWith(`next-auth.session-token=${jwt}`))).toBeNull();
    // What decides is the token's own expiry against the clock, not a mark left by an earlier read.
    vi.setSystemTime(new Date("2026-12-02T08:30:00Z"));
    expect(await tokenUser(requestWith(`next-auth.session-token=${jwt}`))).toEqual({ id: "user-7", role: "technician", sv: 0 });
  });
});
