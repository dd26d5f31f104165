// Builds the app for production and serves it for the end-to-end tests. E2E_SKIP_BUILD=1
// reuses an existing build.
import type { TestProject } from "vitest/node";
import { buildApp, freePort, randomSecret, startServer, type RunningServer } from "./server";

declare module "vitest" {
  export interface ProvidedContext {
    baseURL: string;
    dataDir: string;
  }
}

let server: RunningServer | undefined;

export async function setup(project: TestProject) {
  const secret = randomSecret();
  buildApp(secret, process.env.E2E_SKIP_BUILD !== "1");
  // Mail goes to the server's own local catcher, written as .eml files under its data directory.
  server = await startServer(secret, {
    GRINDFADE_SIGNIN_MAX_FAILURES: "3",
    GRINDFADE_FAKE_SMTP: "on",
    GRINDFADE_FAKE_SMTP_PORT: String(await freePort()),
    GRINDFADE_MAIL_INTERVAL_MS: "1000",
  });
  project.provide("baseURL", server.baseURL);
  project.provide("dataDir", server.dataDir);
}

export async function teardown() {
  await server?.stop();
}
