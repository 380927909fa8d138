/** @type {import('next').NextConfig} */
const nextConfig = {
  reactStrictMode: true,
  poweredByHeader: false,
  typedRoutes: false,
  // pdfkit reads its font metrics from its own folder at run time: it must stay a plain Node package, not bundled.
  serverExternalPackages: ['pg', 'bcryptjs', 'pdfkit'],
  // Pages get their Content-Security-Policy per request, with a nonce (proxy.ts). Headers set here come first: a route
  // handler's header of the same name is dropped, so the API's policy below is the one its responses carry.
  async headers() {
    return [
      {
        source: '/:path*',
        headers: [
          { key: 'X-Content-Type-Options', value: 'nosniff' },
          { key: 'X-Frame-Options', value: 'DENY' },
          { key: 'Referrer-Policy', value: 'same-origin' },
          // Production only: a development host reached over https (a tunnel) would be held to https for two years.
          ...(process.env.NODE_ENV === 'production' ? [{ key: 'Strict-Transport-Security', value: 'max-age=63072000; includeSubDomains' }] : []),
        ],
      },
      {
        // JSON, exports, certificates and photos: nothing in them may load or run anything, opened directly or not.
        source: '/api/:path*',
        headers: [{ key: 'Content-Security-Policy', value: "default-src 'none'; frame-ancestors 'none'; sandbox" }],
      },
      // The report PDF opens in the browser's viewer, which Chromium leaves blank under default-src 'none' or sandbox.
      ...['/api/sessions/:id/report', '/api/reports/:token'].map((source) => ({
        source,
        headers: [{ key: 'Content-Security-Policy', value: "frame-ancestors 'none'" }],
      })),
    ];
  },
};

export default nextConfig;
