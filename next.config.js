// @ts-check
/** @type {import('next').NextConfig} */
const securityHeaders = [
  { key: 'X-Content-Type-Options', value: 'nosniff' },
  { key: 'Referrer-Policy', value: 'same-origin' },
  { key: 'X-Frame-Options', value: 'DENY' },
  {
    key: 'Content-Security-Policy',
    value: [
      "default-src 'self'",
      "script-src 'self' 'unsafe-inline'",
      "style-src 'self' 'unsafe-inline'",
      "img-src 'self' data: blob:",
      "connect-src 'self'",
      "frame-ancestors 'none'",
      "base-uri 'self'",
      "form-action 'self'",
    ].join('; '),
  },
];

const nextConfig = {
  reactStrictMode: true,
  poweredByHeader: false,
  // Types are checked once, for the whole repository, by `tsc --noEmit` in `npm test`; the build
  // does not repeat it.
  typescript: { ignoreBuildErrors: true },
  // Native and worker-thread packages stay outside the server bundle.
  serverExternalPackages: ['better-sqlite3', '@prisma/adapter-better-sqlite3', 'pg', 'piscina', 'pg-boss', 'tsx'],
  async headers() {
    return [{ source: '/:path*', headers: securityHeaders }];
  },
};

export default nextConfig;
