// `npm run check:budgets [-- --dir=<project>] [-- --json=<file>]`: the JavaScript each app route loads first, read
// from a production build's `.next` (not a browser): the framework's root chunks plus every chunk the client
// reference manifest lists for the route's layouts, boundaries and page. Prints a table, raw and gzipped (zlib
// level 9, as scripts/screenshots.ts measures in a browser; 1 kB = 1,000 bytes), and exits 1 when a budget is
// exceeded:
// - the field view (/sessions/[id]/field) under 200 kB gzipped, and none of its chunks carrying three.js: it runs on
//   a technician's phone over a site's mobile link;
// - every other route under 400 kB gzipped: the coach and replay views draw the machine with three.js (about
//   150 kB of it gzipped on top of React and Next's ~130 kB) on an office computer; 400 kB leaves them room and
//   still catches a heavy library arriving in a page that did not need it.
import { existsSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { runInNewContext } from 'node:vm';
import { gzipSync } from 'node:zlib';

export const FIELD_ROUTE = '/sessions/[id]/field';
export const FIELD_BUDGET_GZIP = 200_000;
export const OTHER_BUDGET_GZIP = 400_000;

/**
 * Strings found in three.js's own build and nowhere else in Levelwire's bundles: its warnings name their classes
 * (`THREE.WebGLRenderer: ...`) and its renderer marks itself (`isWebGLRenderer`); minifying keeps both.
 */
export const THREE_MARKERS = ['THREE.WebGLRenderer', 'isWebGLRenderer'];

/** A route's address from its manifest key: "/(app)/sessions/[id]/field/page" → "/sessions/[id]/field". */
export function routeOf(manifestKey: string): string {
  const parts = manifestKey
    .split('/')
    .filter((p) => p !== '' && !(p.startsWith('(') && p.endsWith(')')));
  if (parts.at(-1) === 'page') parts.pop();
  return `/${parts.join('/')}`;
}

/**
 * Reads one `page_client-reference-manifest.js` (a script that assigns `globalThis.__RSC_MANIFEST[key]`), run in an
 * empty context (where `globalThis` is the context itself): its key and the chunks each segment of the route's tree needs (`entryJSFiles`).
 */
export function parseClientManifest(code: string): { key: string; entryJSFiles: Record<string, string[]> } {
  const sandbox: { __RSC_MANIFEST?: Record<string, { entryJSFiles?: Record<string, string[]> }> } = {};
  runInNewContext(code, sandbox, { timeout: 1000 });
  const entries = Object.entries(sandbox.__RSC_MANIFEST ?? {});
  if (entries.length !== 1) throw new Error(`expected one route in the manifest, found ${entries.length}`);
  const [key, manifest] = entries[0]!;
  return { key, entryJSFiles: manifest.entryJSFiles ?? {} };
}

/** The unique chunks a route loads first: the root chunks, then each segment's, in order, each once. */
export function firstLoadChunks(rootMainFiles: string[], entryJSFiles: Record<string, string[]>): string[] {
  return [...new Set([...rootMainFiles, ...Object.values(entryJSFiles).flat()])];
}

/**
 * The chunks a route may load later (a dynamic import): Turbopack names each chunk a loaded chunk can ask for in its
 * code, so the names found in the first-load chunks, followed transitively, are every chunk the route can reach.
 */
export function lazyChunks(firstLoad: string[], read: (chunk: string) => string): string[] {
  const seen = new Set(firstLoad);
  const lazy: string[] = [];
  const queue = [...firstLoad];
  while (queue.length > 0) {
    for (const name of read(queue.shift()!).match(/static\/chunks\/[\w.-]+\.js/g) ?? []) {
      if (seen.has(name)) continue;
      seen.add(name);
      lazy.push(name);
      queue.push(name);
    }
  }
  return lazy;
}

export type RouteSize = { route: string; chunks: string[]; rawBytes: number; gzipBytes: number; lazyGzipBytes: number; three: boolean; lazyThree: boolean };
export type Check = { route: string; what: string; ok: boolean; detail: string };

/** The budgets a route is held to; each is one check. */
export function checkRoute(r: RouteSize): Check[] {
  const kb = (b: number) => `${(b / 1000).toFixed(1)} kB`;
  const limit = r.route === FIELD_ROUTE ? FIELD_BUDGET_GZIP : OTHER_BUDGET_GZIP;
  const checks: Check[] = [{ route: r.route, what: `under ${kb(limit)} gzip`, ok: r.gzipBytes < limit, detail: kb(r.gzipBytes) }];
  if (r.route === FIELD_ROUTE) {
    const ok = !r.three && !r.lazyThree;
    checks.push({ route: r.route, what: 'no three.js', ok, detail: ok ? 'none' : r.three ? 'a first-load chunk carries three.js' : 'a lazily loaded chunk carries three.js' });
  }
  return checks;
}

function findManifests(dir: string): string[] {
  if (!existsSync(dir)) return [];
  return readdirSync(dir, { withFileTypes: true }).flatMap((d) => {
    const p = path.join(dir, d.name);
    if (d.isDirectory()) return findManifests(p);
    return d.name === 'page_client-reference-manifest.js' ? [p] : [];
  });
}

/** Every app route of the build in `.next` under `projectDir`, measured. */
export function measureBuild(projectDir: string): RouteSize[] {
  const next = path.join(projectDir, '.next');
  const buildManifest = JSON.parse(readFileSync(path.join(next, 'build-manifest.json'), 'utf8')) as { rootMainFiles: string[] };
  const sizes = new Map<string, { body: string; raw: number; gzip: number; three: boolean }>();
  const sizeOf = (chunk: string) => {
    let s = sizes.get(chunk);
    if (!s) {
      const file = path.join(next, chunk.replace(/^\/?_next\//, ''));
      const body = existsSync(file) ? readFileSync(file) : Buffer.alloc(0);
      s = { body: body.toString('utf8'), raw: body.length, gzip: gzipSync(body, { level: 9 }).length, three: THREE_MARKERS.some((m) => body.includes(m)) };
      sizes.set(chunk, s);
    }
    return s;
  };
  const routes = findManifests(path.join(next, 'server', 'app')).map((file) => {
    const { key, entryJSFiles } = parseClientManifest(readFileSync(file, 'utf8'));
    const chunks = firstLoadChunks(buildManifest.rootMainFiles, entryJSFiles).filter((c) => c.endsWith('.js'));
    const each = chunks.map(sizeOf);
    const later = lazyChunks(chunks, (c) => sizeOf(c).body).map(sizeOf);
    return {
      route: routeOf(key),
      chunks,
      rawBytes: each.reduce((a, s) => a + s.raw, 0),
      gzipBytes: each.reduce((a, s) => a + s.gzip, 0),
      lazyGzipBytes: later.reduce((a, s) => a + s.gzip, 0),
      three: each.some((s) => s.three),
      lazyThree: later.some((s) => s.three),
    };
  });
  return routes.sort((a, b) => a.route.localeCompare(b.route));
}

async function main(): Promise<void> {
  const opt = (name: string) => process.argv.find((a) => a.startsWith(`--${name}=`))?.split('=').slice(1).join('=');
  const dir = path.resolve(opt('dir') ?? '.');
  const json = opt('json');
  if (!existsSync(path.join(dir, '.next', 'BUILD_ID'))) {
    console.error(`no production build in ${dir}/.next: run \`npm run build\` first`);
    if (json) writeFileSync(json, JSON.stringify({ passed: 0, failed: 1 }));
    process.exit(1);
  }
  const routes = measureBuild(dir);
  const checks = routes.flatMap(checkRoute);
  const kb = (b: number) => (b / 1000).toFixed(1);
  console.log(`First-load JavaScript per route (${path.join(dir, '.next')}; gzip level 9, 1 kB = 1,000 bytes)\n`);
  console.log('| route | chunks | raw kB | gzip kB | lazily loadable, gzip kB | three.js | budget |');
  console.log('|---|---|---|---|---|---|---|');
  for (const r of routes) {
    const mine = checks.filter((c) => c.route === r.route);
    console.log(`| ${r.route} | ${r.chunks.length} | ${kb(r.rawBytes)} | ${kb(r.gzipBytes)} | ${kb(r.lazyGzipBytes)} | ${r.three ? 'first load' : r.lazyThree ? 'lazily' : 'no'} | ${mine.map((c) => `${c.ok ? 'ok' : 'OVER'}: ${c.what}`).join('; ')} |`);
  }
  const failed = checks.filter((c) => !c.ok);
  for (const c of failed) console.error(`budget exceeded: ${c.route} ${c.what} (${c.detail})`);
  console.log(`\n${checks.length - failed.length} budgets met, ${failed.length} exceeded`);
  if (json) writeFileSync(json, JSON.stringify({ passed: checks.length - failed.length, failed: failed.length }));
  process.exit(failed.length > 0 ? 1 : 0);
}

if (process.argv[1] && import.meta.url === pathToFileURL(path.resolve(process.argv[1])).href) await main();
