/* s3rver 3.7 ships no types; this covers the part scripts/services/s3.ts uses. */
declare module 's3rver' {
  import type { Server } from 'node:http';
  import type { AddressInfo } from 'node:net';

  interface S3rverBucketConfig {
    name: string;
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
    serviceEndpoint?: string;
    configureBuckets?: S3rverBucketConfig[];
  }

  export default class S3rver {
    constructor(options?: S3rverOptions);
    httpServer?: Server;
    run(): Promise<AddressInfo>;
    close(): Promise<void>;
  }
}
