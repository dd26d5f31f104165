// Server configuration, parsed once with zod so that a bad value fails loudly at start-up.
import path from "node:path";
import { z } from "zod";

const schema = z.object({
  DATABASE_URL: z
    .string()
    .trim()
    .min(1)
    .refine((v) => /^postgres(ql)?:\/\//.test(v), {
      message: "DATABASE_URL must start with postgres:// or postgresql://",
    })
    .optional(),
  GRINDFADE_DATA_DIR: z.string().trim().min(1).default(".data"),
  GRINDFADE_SEED: z.enum(["demo", "none"]).default("demo"),
  GRINDFADE_SIGNIN_MAX_FAILURES: z.coerce.number().int().min(1).max(100).default(5),
  GRINDFADE_SIGNIN_LOCK_MINUTES: z.coerce.number().int().min(1).max(24 * 60).default(15),
  // Wrong passwords from one network address (any accounts) before it must wait.
  GRINDFADE_SIGNIN_MAX_PER_ADDRESS: z.coerce.number().int().min(1).max(10_000).default(30),
  // Reverse proxies in front of the app that append to X-Forwarded-For; 0 (none) takes a client's
  // address from the connection and ignores the header, which anyone can write.
  GRINDFADE_TRUSTED_PROXIES: z.coerce.number().int().min(0).max(10).default(0),
  // The built database thread (db/pglite-thread.ts) that PGlite runs on; the production server
  // sets it. "off", or unset, keeps PGlite on the app's own thread, as `next dev` and tests do.
  GRINDFADE_DB_THREAD: z.string().trim().min(1).optional(),
  NEXTAUTH_SECRET: z.string().min(16).optional(),
  NEXTAUTH_URL: z.string().url().optional(),
  // Recordings and photos go to this S3 bucket instead of the data directory when it is set.
  GRINDFADE_S3_BUCKET: z.string().trim().min(3).max(63).optional(),
  GRINDFADE_S3_ENDPOINT: z.string().url().optional(),
  GRINDFADE_S3_REGION: z.string().trim().min(1).default("us-east-1"),
  AWS_ACCESS_KEY_ID: z.string().min(1).optional(),
  AWS_SECRET_ACCESS_KEY: z.string().min(1).optional(),
});

export type ServerEnv = z.infer<typeof schema> & { dataDir: string; pgliteDir: string };

let cached: ServerEnv | null = null;

export function serverEnv(): ServerEnv {
  if (cached) return cached;
  const raw = Object.fromEntries(
    Object.entries(process.env).filter(([, v]) => v !== undefined && v !== ""),
  );
  const parsed = schema.safeParse(raw);
  if (!parsed.success) {
    const first = parsed.error.issues[0];
    throw new Error(
      `Configuration error: ${first?.path.join(".") ?? "environment"} — ${first?.message ?? "invalid"}`,
    );
  }
  const dataDir = path.resolve(parsed.data.GRINDFADE_DATA_DIR);
  cached = { ...parsed.data, dataDir, pgliteDir: path.join(dataDir, "pglite") };
  return cached;
}

/** For tests that change the environment between cases. */
export function resetServerEnvCache(): void {
  cached = null;
}
