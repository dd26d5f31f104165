import type { NextConfig } from "next";
import { COMMON_HEADERS } from "./lib/security/headers";

const nextConfig: NextConfig = {
  // PGlite ships WebAssembly and data files that must be loaded from node_modules at run time.
  // pdfkit reads its built-in fonts' metrics from its own folder at run time.
  serverExternalPackages: ["@electric-sql/pglite", "pg", "pino", "pdfkit"],
  // No X-Powered-By header.
  poweredByHeader: false,
  typedRoutes: false,
  experimental: {
    // proxy.ts makes Next.js buffer each request body, and past this size it passes on only the
    // first part, with a warning in the log. Above the largest upload taken (a 64 MB recording),
    // so an upload over its limit still reaches the route whole enough to be refused with 413.
    proxyClientMaxBodySize: "65mb",
    // forbidden() from next/navigation: a page refused to a role answers 403 (app/forbidden.tsx).
    authInterrupts: true,
  },
  // `npm test` type-checks the whole project once (next typegen && tsc); the build need not repeat it.
  typescript: { ignoreBuildErrors: true },
  // The content security policy is set per response in proxy.ts (it carries a nonce).
  async headers() {
    return [{ source: "/:path*", headers: Object.entries(COMMON_HEADERS).map(([key, value]) => ({ key, value })) }];
  },
};

export default nextConfig;
