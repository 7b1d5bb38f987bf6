/** @type {import('next').NextConfig} */
const isDev = process.env.NODE_ENV !== 'production';

// Content-Security-Policy of API responses and files (no inline script at all). Pages get theirs
// from proxy.ts with a per-request nonce (lib/server/csp.ts, the same directives otherwise).
const apiCsp = [
  "default-src 'self'",
  `script-src 'self'${isDev ? " 'unsafe-eval'" : ''}`,
  "style-src 'self' 'unsafe-inline'",
  "img-src 'self' data: blob:",
  "font-src 'self'",
  "connect-src 'self' blob: data:",
  "worker-src 'self' blob:",
  "object-src 'none'",
  "base-uri 'self'",
  "form-action 'self'",
  "frame-ancestors 'none'",
].join('; ');

const nextConfig = {
  // A separate build folder lets parallel checkouts or test runs build without clobbering each other.
  distDir: process.env.QUORUM_NEXT_DIST || '.next',
  reactStrictMode: true,
  poweredByHeader: false,
  serverExternalPackages: ['knex', 'mysql2', 'bcryptjs', 'nodemailer', 'smtp-server', 'mailparser', 'archiver'],
  // forbidden() renders app/forbidden.tsx with status 403
  experimental: { authInterrupts: true },
  async headers() {
    return [
      { source: '/api/:path*', headers: [{ key: 'Content-Security-Policy', value: apiCsp }] },
      {
        source: '/:path*',
        headers: [
          { key: 'Referrer-Policy', value: 'strict-origin-when-cross-origin' },
          { key: 'X-Content-Type-Options', value: 'nosniff' },
          { key: 'X-Frame-Options', value: 'DENY' },
          { key: 'Permissions-Policy', value: 'camera=(), microphone=(), geolocation=()' },
        ],
      },
    ];
  },
};

export default nextConfig;
