// s3rver ships no type declarations; this covers the part of its API the fake uses.
declare module "s3rver" {
  import type { IncomingMessage, ServerResponse } from "node:http";

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
    /** Creates the configured buckets and stores their configuration documents. */
    configureBuckets(): Promise<void>;
    /** The Koa request handler, for serving the store from a server of one's own. */
    callback(): (request: IncomingMessage, response: ServerResponse) => void;
  }
}
