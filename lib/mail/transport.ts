// Where mail goes: the SMTP server named by SMTP_URL, or else the local fake mail catcher,
// started on first use in this process.
import nodemailer, { type Transporter } from "nodemailer";
import SMTPTransport from "nodemailer/lib/smtp-transport";
import { mailConfig, type MailConfig } from "./config";
import { startFakeSmtp, type FakeSmtp } from "./fake-smtp";

let fake: Promise<FakeSmtp> | null = null;

/** Starts the local catcher once per process; later calls share it. */
export function ensureFakeSmtp(config: MailConfig = mailConfig()): Promise<FakeSmtp> {
  if (!fake) {
    fake = startFakeSmtp({ port: config.fakePort, host: "127.0.0.1", saveDir: config.fakeMailDir }).catch((err) => {
      // Forget the failed start so the next call tries again rather than failing for ever.
      fake = null;
      throw err;
    });
  }
  return fake;
}

// Short timeouts: a hung server should cost one retry, not hold the worker for minutes.
const timeouts = { connectionTimeout: 15_000, greetingTimeout: 15_000, socketTimeout: 60_000 };

/**
 * A nodemailer transport for the configured server. Without SMTP_URL it points at the local
 * catcher (starting it if needed); in production without SMTP_URL or GRINDFADE_FAKE_SMTP=on it
 * returns null, and mail stays queued until a server is configured.
 */
export async function createTransport(config: MailConfig = mailConfig()): Promise<Transporter | null> {
  if (config.smtpUrl) {
    // Built directly so the timeouts apply: given a bare URL, nodemailer would drop other options.
    return nodemailer.createTransport(new SMTPTransport({ url: config.smtpUrl, ...timeouts }));
  }
  if (!config.useFake) return null;
  const catcher = await ensureFakeSmtp(config);
  return nodemailer.createTransport({
    host: "127.0.0.1",
    port: catcher.port,
    secure: false,
    // The catcher offers no TLS; never try to upgrade the local connection.
    ignoreTLS: true,
    ...timeouts,
  });
}
