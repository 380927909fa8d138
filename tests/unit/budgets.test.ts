import { describe, expect, it } from 'vitest';
import { checkRoute, FIELD_ROUTE, firstLoadChunks, lazyChunks, parseClientManifest, routeOf } from '../../scripts/budgets';

// The shape of a `page_client-reference-manifest.js` as Next 16 with Turbopack writes it (trimmed to what the
// budget check reads): a script assigning the route's manifest on globalThis.
const manifest = (key: string, entry: Record<string, string[]>) =>
  `globalThis.__RSC_MANIFEST = globalThis.__RSC_MANIFEST || {};\nglobalThis.__RSC_MANIFEST[${JSON.stringify(key)}] = ${JSON.stringify({
    moduleLoading: { prefix: '' },
    clientModules: {},
    entryCSSFiles: {},
    entryJSFiles: entry,
  })};`;

describe('routeOf', () => {
  it.each([
    ['/(app)/sessions/[id]/field/page', '/sessions/[id]/field'],
    ['/page', '/'],
    ['/(auth)/sign-in/page', '/sign-in'],
    ['/_not-found/page', '/_not-found'],
    ['/(app)/fleet/(lists)/customers/page', '/fleet/customers'],
  ])('%s is %s', (key, route) => expect(routeOf(key)).toBe(route));
});

describe('parseClientManifest', () => {
  it('reads the key and each segment’s chunks', () => {
    const code = manifest('/(app)/sessions/[id]/field/page', {
      '[project]/app/layout': ['static/chunks/a.js', 'static/chunks/b.js'],
      '[project]/app/(app)/sessions/[id]/field/page': ['static/chunks/a.js', 'static/chunks/f.js'],
    });
    const m = parseClientManifest(code);
    expect(m.key).toBe('/(app)/sessions/[id]/field/page');
    expect(m.entryJSFiles['[project]/app/(app)/sessions/[id]/field/page']).toEqual(['static/chunks/a.js', 'static/chunks/f.js']);
  });

  it('refuses a manifest naming no route', () => {
    expect(() => parseClientManifest('globalThis.__RSC_MANIFEST = {};')).toThrow(/found 0/);
  });

  it('cannot reach this process’s globals', () => {
    expect(() => parseClientManifest('process.exit(3)')).toThrow();
  });
});

describe('firstLoadChunks', () => {
  it('lists the root chunks first, then each segment’s, each once', () => {
    const chunks = firstLoadChunks(['static/chunks/root.js', 'static/chunks/a.js'], {
      layout: ['static/chunks/a.js', 'static/chunks/b.js'],
      page: ['static/chunks/b.js', 'static/chunks/c.js'],
    });
    expect(chunks).toEqual(['static/chunks/root.js', 'static/chunks/a.js', 'static/chunks/b.js', 'static/chunks/c.js']);
  });
});

describe('lazyChunks', () => {
  it('follows the chunk names a loaded chunk mentions, transitively, leaving out what is loaded first', () => {
    const bodies: Record<string, string> = {
      'static/chunks/page.js': 'e.l("static/chunks/panel.js");e.l("static/chunks/shared.js")',
      'static/chunks/panel.js': 'x("static/chunks/deep.js")',
      'static/chunks/deep.js': '',
      'static/chunks/shared.js': '',
    };
    expect(lazyChunks(['static/chunks/page.js', 'static/chunks/shared.js'], (c) => bodies[c] ?? '').sort()).toEqual(['static/chunks/deep.js', 'static/chunks/panel.js']);
  });
});

describe('checkRoute', () => {
  const size = (route: string, gzipBytes: number, three = false, lazyThree = false) => ({ route, chunks: [], rawBytes: gzipBytes * 3, gzipBytes, lazyGzipBytes: 0, three, lazyThree });

  it('holds the field view to 200 kB and no three.js, first or lazily loaded', () => {
    expect(checkRoute(size(FIELD_ROUTE, 199_999)).map((c) => c.ok)).toEqual([true, true]);
    expect(checkRoute(size(FIELD_ROUTE, 200_000)).map((c) => c.ok)).toEqual([false, true]);
    expect(checkRoute(size(FIELD_ROUTE, 150_000, true)).map((c) => c.ok)).toEqual([true, false]);
    expect(checkRoute(size(FIELD_ROUTE, 150_000, false, true)).map((c) => c.ok)).toEqual([true, false]);
  });

  it('holds every other route to 400 kB and lets it load three.js', () => {
    expect(checkRoute(size('/sessions/[id]/coach', 399_999, true)).map((c) => c.ok)).toEqual([true]);
    expect(checkRoute(size('/fleet', 400_000)).map((c) => c.ok)).toEqual([false]);
  });
});
