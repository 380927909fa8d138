// The Content-Security-Policy of Levelwire's pages, built per request around a fresh nonce (proxy.ts sends it). The
// headers that never change per request (nosniff, framing, referrer, HSTS, the API's policy) are in next.config.mjs.

/** A nonce for one response: 128 random bits in base64. */
export function createNonce(): string {
  return Buffer.from(crypto.getRandomValues(new Uint8Array(16))).toString('base64');
}

/**
 * The pages' policy: the app's own origin only. Scripts run when they carry the request's nonce (Next puts it on its
 * own) or when such a script loads them ('strict-dynamic': Next's chunks, three.js). `dev` adds what `next dev` needs:
 * eval for React's error stacks, and inline style elements, which the dev server injects without a nonce.
 */
export function pagePolicy({ nonce, dev }: { nonce: string; dev: boolean }): string {
  const directives: [string, ...string[]][] = [
    ['default-src', "'self'"],
    ['script-src', "'self'", `'nonce-${nonce}'`, "'strict-dynamic'", ...(dev ? ["'unsafe-eval'"] : [])],
    ['style-src', "'self'", ...(dev ? ["'unsafe-inline'"] : [`'nonce-${nonce}'`])],
    // React writes style attributes into server-rendered HTML (the tilt view's height legend), which would not apply
    // otherwise; they cannot run code, and img-src and font-src keep any url() in them to this origin.
    ['style-src-attr', "'unsafe-inline'"],
    // Photos come from the app's API; a photo waiting to upload is shown from a blob: URL, which only this page's own
    // scripts can make (from the file kept on the device). The tilt view draws its labels on canvases, the
    // stylesheets hold no data: URLs.
    ['img-src', "'self'", 'blob:'],
    ['font-src', "'self'"],
    // 'self' covers the socket's ws:/wss: to this origin (CSP 3; Chromium, Firefox and Safari 15.4+).
    ['connect-src', "'self'"],
    ['worker-src', "'self'"],
    ['object-src', "'none'"],
    ['base-uri', "'self'"],
    ['form-action', "'self'"],
    ['frame-ancestors', "'none'"],
  ];
  return directives.map((d) => d.join(' ')).join('; ');
}
