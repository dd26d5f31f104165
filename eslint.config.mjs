import next from "eslint-config-next";

const config = [
  ...next,
  { ignores: [".next/**", "node_modules/**", ".data/**", ".test-data/**", "db/migrations/**", "next-env.d.ts"] },
];
export default config;
