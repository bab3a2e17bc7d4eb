import { mkdirSync } from 'node:fs';
import path from 'node:path';
import S3rver from 's3rver';
import { StartError, assertPortFree } from './util';

/*
 * An S3-compatible fake (s3rver) for the demo and the tests, on 127.0.0.1 with its own folder. The
 * bucket gets a CORS rule for the app's origins so browsers can PUT and GET through presigned URLs,
 * as they would against MinIO or S3.
 */

export interface S3FakeOptions {
  port: number;
  dataDir: string;
  bucket: string;
  /** Origins allowed to PUT/GET from a browser, e.g. http://localhost:3000. */
  allowedOrigins: string[];
}

export interface RunningS3Fake {
  /** Host name for S3_ENDPOINT. */
  endpoint: string;
  port: number;
  accessKey: string;
  secretKey: string;
  bucket: string;
  stop(): Promise<void>;
}

const xmlEscape = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');

export function corsConfiguration(origins: string[]): string {
  const rule =
    origins.map((o) => `<AllowedOrigin>${xmlEscape(o)}</AllowedOrigin>`).join('') +
    ['GET', 'HEAD', 'PUT'].map((m) => `<AllowedMethod>${m}</AllowedMethod>`).join('') +
    '<AllowedHeader>*</AllowedHeader><ExposeHeader>ETag</ExposeHeader><MaxAgeSeconds>600</MaxAgeSeconds>';
  return `<CORSConfiguration><CORSRule>${rule}</CORSRule></CORSConfiguration>`;
}

export async function startS3Fake(opts: S3FakeOptions): Promise<RunningS3Fake> {
  await assertPortFree(opts.port, 'the S3 fake', 'PLUMBLINE_S3_PORT');
  const directory = path.resolve(opts.dataDir);
  mkdirSync(directory, { recursive: true });

  const server = new S3rver({
    address: '127.0.0.1',
    port: opts.port,
    directory,
    silent: true,
    // Path-style only: the MinIO client is configured with pathStyle, and 127.0.0.1 has no subdomains.
    vhostBuckets: false,
    configureBuckets: [{ name: opts.bucket, configs: [corsConfiguration(opts.allowedOrigins)] }],
  });
  try {
    await server.run();
  } catch (err) {
    throw new StartError(
      `the S3 fake could not start on port ${opts.port}: ${err instanceof Error ? err.message : String(err)}`,
    );
  }

  let stopped = false;
  return {
    endpoint: '127.0.0.1',
    port: opts.port,
    // s3rver accepts exactly this pair (its built-in credentials).
    accessKey: 'S3RVER',
    secretKey: 'S3RVER',
    bucket: opts.bucket,
    async stop() {
      if (stopped) return;
      stopped = true;
      server.httpServer?.closeAllConnections();
      await server.close();
    },
  };
}
