'use client';

/** The cache the field view's service worker reads; public/field-sw.js uses the same name. */
export const FIELD_CACHE = 'levelwire-field-v1';

/**
 * Registers the field view's service worker (scope /sessions/, so only session pages are touched), then puts this
 * page and the scripts, styles and fonts it loaded into the worker's cache, so a reload without a network works
 * from the very first visit. In development the worker goes to the network first for scripts too (they change
 * without changing their names); the cache is then only the fallback when there is no network.
 */
export async function registerFieldWorker(): Promise<void> {
  if (typeof window === 'undefined' || !('serviceWorker' in navigator) || !('caches' in window)) return;
  const dev = process.env.NODE_ENV !== 'production';
  try {
    await navigator.serviceWorker.register(`/field-sw.js${dev ? '?dev=1' : ''}`, { scope: '/sessions/' });
  } catch {
    return; // no worker (private mode, insecure origin): the view still works online, and the outbox still keeps entries
  }
  if (!navigator.onLine) return;
  const cache = await caches.open(FIELD_CACHE);
  const urls = new Set<string>();
  for (const e of performance.getEntriesByType('resource')) {
    const u = new URL(e.name);
    if (u.origin === location.origin && u.pathname.startsWith('/_next/static/')) urls.add(u.href);
  }
  document.querySelectorAll<HTMLScriptElement>('script[src]').forEach((s) => urls.add(new URL(s.src, location.href).href));
  document.querySelectorAll<HTMLLinkElement>('link[rel="stylesheet"], link[rel="preload"][as="style"], link[rel="preload"][as="font"]').forEach((l) => urls.add(new URL(l.href, location.href).href));
  const same = [...urls].filter((u) => new URL(u).origin === location.origin && new URL(u).pathname.startsWith('/_next/static/'));
  await Promise.all(
    [...same.map(async (u) => ((await cache.match(u)) ? undefined : cache.add(u))), cache.add(new Request(location.href, { credentials: 'same-origin' }))].map((p) =>
      Promise.resolve(p).catch(() => undefined),
    ),
  );
}
