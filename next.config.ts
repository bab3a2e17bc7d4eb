import type { NextConfig } from 'next';
import { getEnv } from './config/env';

// Validate every setting once at build and at start: a bad configuration fails here with a message
// naming each setting, not later inside a request.
const env = getEnv();

const nextConfig: NextConfig = {
  distDir: env.NEXT_DIST_DIR,
  reactStrictMode: true,
  poweredByHeader: false,
  serverExternalPackages: ['mysql2', 'bcryptjs', 'minio', 'nodemailer'],
  // Request paths can carry one-time approval tokens (/review/<token>): never write them to a log.
  logging: { incomingRequests: false },
  experimental: {
    authInterrupts: true,
  },
  async headers() {
    return [
      {
        source: '/:path*',
        headers: [
          { key: 'X-Content-Type-Options', value: 'nosniff' },
          { key: 'Referrer-Policy', value: 'same-origin' },
          { key: 'X-Frame-Options', value: 'DENY' },
        ],
      },
    ];
  },
};

export default nextConfig;
