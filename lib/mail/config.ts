// Mail settings, parsed with zod like lib/env.ts so that a mistyped SMTP_URL fails loudly at
// start-up instead of when the first head report goes out.
import path from "node:path";
import { z } from "zod";
import { serverEnv } from "@/lib/env";

const schema = z.object({
  SMTP_URL: z
    .string()
    .trim()
    .min(1)
    .refine((v) => /^smtps?:\/\/[^/]+/.test(v), { message: "SMTP_URL must start with smtp:// or smtps://" })
    .optional(),
  MAIL_FROM: z.string().trim().min(3).default("Grindfade <no-reply@grindfade.local>"),
  GRINDFADE_FAKE_SMTP_PORT: z.coerce.number().int().min(1).max(65535).default(2525),
  GRINDFADE_FAKE_SMTP: z.enum(["on", "off"]).optional(),
  NODE_ENV: z.string().optional(),
});

export interface MailConfig {
  smtpUrl: string | null;
  from: string;
  fakePort: number;
  /** True when mail goes to the local fake server instead of a real one. */
  useFake: boolean;
  /** Where the fake keeps a copy of each message, so a developer can open it in a mail client. */
  fakeMailDir: string;
}

export function mailConfig(env: Record<string, string | undefined> = process.env): MailConfig {
  const raw = Object.fromEntries(Object.entries(env).filter(([, v]) => v !== undefined && v !== ""));
  const parsed = schema.safeParse(raw);
  if (!parsed.success) {
    const first = parsed.error.issues[0];
    throw new Error(`Configuration error: ${first?.path.join(".") ?? "mail"} — ${first?.message ?? "invalid"}`);
  }
  const d = parsed.data;
  const smtpUrl = d.SMTP_URL ?? null;
  // A configured server always wins; without one, production sends nothing unless the fake is
  // asked for explicitly, so a missing setting never silently swallows customers' reports.
  const useFake = smtpUrl === null && (d.NODE_ENV !== "production" || d.GRINDFADE_FAKE_SMTP === "on");
  return {
    smtpUrl,
    from: d.MAIL_FROM,
    fakePort: d.GRINDFADE_FAKE_SMTP_PORT,
    useFake,
    fakeMailDir: path.join(serverEnv().dataDir, "mail"),
  };
}
