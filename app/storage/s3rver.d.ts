// s3rver ships no types; the part of its API the local fake uses.
declare module "s3rver" {
  import type { Server } from "node:http";
  type Options = {
    address?: string;
    port?: number;
    directory?: string;
    silent?: boolean;
    resetOnClose?: boolean;
    vhostBuckets?: boolean;
    allowMismatchedSignatures?: boolean;
    configureBuckets?: Array<{ name: string; configs?: Array<string | Buffer> }>;
  };
  export default class S3rver {
    constructor(options?: Options);
    httpServer?: Server;
    run(): Promise<{ address: string; port: number }>;
    close(): Promise<void>;
  }
}
