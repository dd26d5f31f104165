// The fake S3 server ships no types; only what the tests use is declared.
declare module "s3rver" {
  import type { AddressInfo } from "node:net";
  export default class S3rver {
    constructor(options: { address?: string; port?: number; directory: string; silent?: boolean; resetOnClose?: boolean });
    run(): Promise<AddressInfo>;
    close(): Promise<void>;
  }
}
