/** The part of s3rver's API the tests and the scale bench use (the package ships no types). */
declare module 's3rver' {
  import type { Server } from 'node:http';
  interface S3rverOptions {
    address?: string;
    port?: number;
    silent?: boolean;
    directory?: string;
    resetOnClose?: boolean;
    allowMismatchedSignatures?: boolean;
    vhostBuckets?: boolean;
    configureBuckets?: { name: string; configs?: string[] }[];
  }
  export default class S3rver {
    constructor(options?: S3rverOptions);
    run(): Promise<{ address: string; port: number }>;
    close(): Promise<void>;
    reset(): void;
    httpServer?: Server;
    /** Koa's middleware list, composed when the server starts. */
    middleware: unknown[];
  }
}
