// The part of s3rver's programmatic API the tests use (the package ships no types).
declare module "s3rver" {
  import type { Server } from "node:http";
  export default class S3rver {
    constructor(options: { port?: number; address?: string; silent?: boolean; directory?: string; configureBuckets?: { name: string; configs?: unknown[] }[] });
    httpServer?: Server;
    run(): Promise<unknown>;
    close(): Promise<void>;
  }
}
