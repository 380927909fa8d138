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
  const loaded = [
    ...performance.getEntriesByType('resource').map((e) => e.name),
    ...[...document.querySelectorAll<HTMLScriptElement>('script[src]')].map((s) => s.src),
    ...[...document.querySelectorAll<HTMLLinkElement>('link[rel="stylesheet"], link[rel="preload"][as="style"], link[rel="preload"][as="font"]')].map((l) => l.href),
  ].map((u) => new URL(u, location.href));
  const same = [...new Set(loaded.filter((u) => u.origin === location.origin && u.pathname.startsWith('/_next/static/')).map((u) => u.href))];
  await Promise.all(
    [...same.map(async (u) => ((await cache.match(u)) ? undefined : cache.add(u))), cache.add(new Request(location.href, { credentials: 'same-origin' }))].map((p) =>
      Promise.resolve(p).catch(() => undefined),
    ),
  );
}
