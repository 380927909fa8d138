import { afterEach, describe, expect, it, vi } from 'vitest';
import { createNonce, pagePolicy } from '@/lib/security-headers';

/** A policy as directive name → its sources; a directive named twice fails the test (browsers keep only the first). */
function parse(policy: string): Map<string, string[]> {
  const out = new Map<string, string[]>();
  for (const part of policy.split(';')) {
    const [name, ...sources] = part.trim().split(/\s+/);
    expect(out.has(name!), `${name} named twice`).toBe(false);
    out.set(name!, sources);
  }
  return out;
}

describe('the CSP nonce', () => {
  it('is 128 bits of base64 and new each time', () => {
    const nonces = Array.from({ length: 500 }, createNonce);
    for (const n of nonces) {
      expect(n).toMatch(/^[A-Za-z0-9+/]{22}==$/);
      expect(Buffer.from(n, 'base64')).toHaveLength(16);
    }
    expect(new Set(nonces).size).toBe(nonces.length);
  });
});

describe('the pages’ policy', () => {
  const nonce = 'bm9uY2Utb2YtdGhlLXRlc3Q=';

  it('in production: the own origin only, scripts and style elements by the nonce, no eval, no framing', () => {
    const p = parse(pagePolicy({ nonce, dev: false }));
    expect(p.get('default-src')).toEqual(["'self'"]);
    expect(p.get('script-src')).toEqual(["'self'", `'nonce-${nonce}'`, "'strict-dynamic'"]);
    expect(p.get('style-src')).toEqual(["'self'", `'nonce-${nonce}'`]);
    expect(p.get('style-src-attr')).toEqual(["'unsafe-inline'"]);
    expect(p.get('img-src')).toEqual(["'self'", 'blob:']);
    expect(p.get('connect-src')).toEqual(["'self'"]);
    expect(p.get('worker-src')).toEqual(["'self'"]);
    expect(p.get('font-src')).toEqual(["'self'"]);
    expect(p.get('object-src')).toEqual(["'none'"]);
    expect(p.get('base-uri')).toEqual(["'self'"]);
    expect(p.get('form-action')).toEqual(["'self'"]);
    expect(p.get('frame-ancestors')).toEqual(["'none'"]);
  });

  it('names no other host, scheme or wildcard anywhere (blob: for images only: photos waiting on the device)', () => {
    for (const dev of [false, true]) {
      for (const [directive, sources] of parse(pagePolicy({ nonce, dev }))) {
        const allowed = directive === 'img-src' ? sources.filter((s) => s !== 'blob:') : sources;
        for (const s of allowed) expect(s, `${directive} ${s}`).toMatch(/^'(self|none|strict-dynamic|unsafe-eval|unsafe-inline|nonce-[A-Za-z0-9+/=]+)'$/);
      }
    }
  });

  it('in development adds eval for React’s error stacks and inline style elements, which a nonce would switch off', () => {
    const p = parse(pagePolicy({ nonce, dev: true }));
    expect(p.get('script-src')).toEqual(["'self'", `'nonce-${nonce}'`, "'strict-dynamic'", "'unsafe-eval'"]);
    // Browsers ignore 'unsafe-inline' beside a nonce (W3C CSP, since Level 2): development lists none for styles.
    expect(p.get('style-src')).toEqual(["'self'", "'unsafe-inline'"]);
    expect(p.get('frame-ancestors')).toEqual(["'none'"]);
  });

  it('carries the nonce it was given, so each response has its own', () => {
    expect(pagePolicy({ nonce: 'YQ==', dev: false })).not.toBe(pagePolicy({ nonce: 'Yg==', dev: false }));
    expect(pagePolicy({ nonce: 'YQ==', dev: false })).toContain("'nonce-YQ=='");
  });
});

describe('next.config.mjs headers', () => {
  type Rule = { source: string; headers: { key: string; value: string }[] };
  // A path, not a literal: the config is plain JavaScript that TypeScript is not asked to type.
  const configUrl = new URL('../../next.config.mjs', import.meta.url).href;
  const rules = async (): Promise<Rule[]> => {
    const { default: config } = (await import(/* @vite-ignore */ configUrl)) as { default: { headers: () => Promise<Rule[]> } };
    return config.headers();
  };
  const everywhere = async () => (await rules()).find((r) => r.source === '/:path*')!.headers.map((h) => h.key);
  afterEach(() => vi.unstubAllEnvs());

  it('sends HSTS for two years, subdomains included, in a production build only', async () => {
    vi.stubEnv('NODE_ENV', 'production');
    const hsts = (await rules()).find((r) => r.source === '/:path*')!.headers.find((h) => h.key === 'Strict-Transport-Security');
    expect(hsts?.value).toBe('max-age=63072000; includeSubDomains');
    vi.stubEnv('NODE_ENV', 'development');
    expect(await everywhere()).not.toContain('Strict-Transport-Security');
    expect(await everywhere()).toEqual(expect.arrayContaining(['X-Content-Type-Options', 'X-Frame-Options', 'Referrer-Policy']));
  });

  it('gives the API a policy that loads and runs nothing; the report PDFs, listed after it, only keep frames out', async () => {
    const all = await rules();
    const csp = (r: Rule | undefined) => r?.headers.find((h) => h.key === 'Content-Security-Policy')?.value;
    const api = all.findIndex((r) => r.source === '/api/:path*');
    expect(csp(all[api])).toBe("default-src 'none'; frame-ancestors 'none'; sandbox");
    // Of two rules setting one header, Next keeps the later one.
    for (const source of ['/api/sessions/:id/report', '/api/reports/:token']) {
      const at = all.findIndex((r) => r.source === source);
      expect(at, source).toBeGreaterThan(api);
      expect(csp(all[at])).toBe("frame-ancestors 'none'");
    }
  });
});
