// Every page gets its own CSP nonce. Next reads it from the request's Content-Security-Policy header and puts it on the
// scripts and style elements it renders, which is why every page renders per request (app/layout.tsx).
import { NextResponse, type NextRequest } from 'next/server';
import { createNonce, pagePolicy } from '@/lib/security-headers';

export function proxy(request: NextRequest) {
  const nonce = createNonce();
  const policy = pagePolicy({ nonce, dev: process.env.NODE_ENV === 'development' });
  const headers = new Headers(request.headers);
  headers.set('x-nonce', nonce);
  headers.set('content-security-policy', policy);
  const response = NextResponse.next({ request: { headers } });
  response.headers.set('content-security-policy', policy);
  return response;
}

export const config = {
  matcher: [
    // Not the API: its policy is static (next.config.mjs), and a proxy would buffer upload bodies (cut at 10 MB).
    // Not static files. Router prefetches do pass through: a page response never goes out without its policy.
    '/((?!api/|_next/static/|_next/image|favicon.ico|icon.svg|field-sw.js).*)',
  ],
};
