// s3rver ships no type declarations; this covers the part of its API the fake uses.
declare module "s3rver" {
  import type { AddressInfo } from "node:net";

  interface S3rverBucket {
    name: string;
    /** Bucket configuration documents (CORS or website XML). */
    configs?: (string | Buffer)[];
  }

  interface S3rverOptions {
    address?: string;
    port?: number;
    silent?: boolean;
    directory?: string;
    resetOnClose?: boolean;
    allowMismatchedSignatures?: boolean;
    vhostBuckets?: boolean;
    configureBuckets?: S3rverBucket[];
  }

  export default class S3rver {
    constructor(options?: S3rverOptions);
    run(): Promise<AddressInfo>;
    close(): Promise<void>;
  }
}
