// The requests refused before the framework: unserved methods, server-action bodies it cannot
// read, and cookies next-auth trips over. Each was a 500 from the framework or next-auth.
import { describe, expect, it } from "vitest";
import { actionBodyProblem, cleanCookieHeader, isServedMethod } from "@/lib/security/request-gate";

const HERE = "http://shop.test";

describe("isServedMethod", () => {
  it("serves the methods our routes answer and nothing else", () => {
    for (const m of ["GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS"]) expect(isServedMethod(m), m).toBe(true);
    for (const m of ["TRACE", "TRACK", "CONNECT", "PROPFIND", "get", "", undefined]) expect(isServedMethod(m), String(m)).toBe(false);
  });
});

describe("cleanCookieHeader", () => {
  it("keeps the first of each name and leaves a clean header alone", () => {
    expect(cleanCookieHeader("a=1; b=2", [HERE])).toBeNull();
    expect(cleanCookieHeader(null, [HERE])).toBeNull();
    expect(cleanCookieHeader("next-auth.session-token=x; next-auth.session-token=y; b=2", [HERE])).toBe("next-auth.session-token=x; b=2");
  });

  it("drops a sign-in callback address that is not one of ours", () => {
    const ours = `next-auth.callback-url=${encodeURIComponent(`${HERE}/jobs`)}`;
    expect(cleanCookieHeader(ours, [HERE])).toBeNull();
    for (const value of ["a", "", "%E0%A4%A", encodeURIComponent("https://elsewhere.example/"), "javascript%3Aalert(1)"]) {
      expect(cleanCookieHeader(`next-auth.callback-url=${value}; k=1`, [HERE]), value).toBe("k=1");
    }
    expect(cleanCookieHeader(`${ours}; next-auth.callback-url=a`, [HERE])).toBe(ours);
  });
});

const post = (type: string | null, body: BodyInit) =>
  new Request(`${HERE}/jobs/x`, { method: "POST", headers: type ? { "content-type": type } : {}, body });

describe("actionBodyProblem", () => {
  it("takes what the page sends: a JSON array, form data with the array in field 0, a form sent without JavaScript", async () => {
    expect(await actionBodyProblem(post("text/plain;charset=UTF-8", '["$K1"]'))).toBeNull();
    const fetchForm = new FormData();
    fetchForm.set("0", '["$K1"]');
    fetchForm.set("1_jobId", "abc");
    expect(await actionBodyProblem(post(null, fetchForm))).toBeNull();
    const plainForm = new FormData();
    plainForm.set("$ACTION_ID_60920433459f91539f3c14bf5f2a0716a58103aa72", "");
    expect(await actionBodyProblem(post(null, plainForm))).toBeNull();
  });

  it("refuses bodies the framework cannot read, with a sentence", async () => {
    const bad: Array<[string | null, BodyInit]> = [
      ["text/plain;charset=UTF-8", ""],
      ["text/plain;charset=UTF-8", "not json"],
      ["text/plain;charset=UTF-8", "[1,2"],
      ["text/plain;charset=UTF-8", '"x"'],
      [null, "{}"],
      ["multipart/form-data; boundary=xyz", "garbage"],
      ["multipart/form-data", "garbage"],
      ["multipart/form-data; boundary=xyz", '--xyz\r\nContent-Disposition: form-data; name="0"\r\n\r\nx\r\n--xyz--\r\n'],
      ["multipart/form-data; boundary=xyz", '--xyz\r\nContent-Disposition: form-data; name="other"\r\n\r\nx\r\n--xyz--\r\n'],
    ];
    for (const [type, body] of bad) expect(await actionBodyProblem(post(type, body)), `${type} ${String(body)}`).toMatch(/Reload the page/);
  });
});
