// Which server mail goes to: a configured SMTP_URL, the local catcher in development, nothing
// in production unless the catcher is asked for.
import { describe, expect, it } from "vitest";
import { mailConfig } from "@/lib/mail/config";

describe("mail configuration", () => {
  it("uses the local catcher on port 2525 by default outside production", () => {
    const c = mailConfig({ NODE_ENV: "development" });
    expect(c).toMatchObject({ smtpUrl: null, useFake: true, fakePort: 2525, from: "Grindfade <no-reply@grindfade.local>" });
    expect(c.fakeMailDir).toMatch(/mail$/);
  });

  it("sends for real when SMTP_URL is set, even with the catcher switched on", () => {
    const c = mailConfig({ NODE_ENV: "development", SMTP_URL: "smtps://user:pw@mail.example.test:465", GRINDFADE_FAKE_SMTP: "on" });
    expect(c.useFake).toBe(false);
    expect(c.smtpUrl).toBe("smtps://user:pw@mail.example.test:465");
  });

  it("sends nothing in production without a server unless the catcher is asked for", () => {
    expect(mailConfig({ NODE_ENV: "production" }).useFake).toBe(false);
    expect(mailConfig({ NODE_ENV: "production", GRINDFADE_FAKE_SMTP: "on" }).useFake).toBe(true);
  });

  it("refuses a URL that is not smtp:// or smtps:// and a port out of range", () => {
    expect(() => mailConfig({ SMTP_URL: "https://mail.example.test" })).toThrow(/SMTP_URL must start with smtp:\/\//);
    expect(() => mailConfig({ GRINDFADE_FAKE_SMTP_PORT: "70000" })).toThrow(/GRINDFADE_FAKE_SMTP_PORT/);
    expect(mailConfig({ GRINDFADE_FAKE_SMTP_PORT: "2626", MAIL_FROM: "Shop <shop@example.test>" })).toMatchObject({
      fakePort: 2626,
      from: "Shop <shop@example.test>",
    });
  });
});
