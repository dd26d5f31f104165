import type { NextConfig } from "next";

const nextConfig: NextConfig = {
  // PGlite ships WebAssembly and data files that must be loaded from node_modules at run time.
  serverExternalPackages: ["@electric-sql/pglite", "pg"],
  poweredByHeader: false,
  typedRoutes: false,
  // `npm test` type-checks the whole project once (next typegen && tsc); the build need not repeat it.
  typescript: { ignoreBuildErrors: true },
};

export default nextConfig;
