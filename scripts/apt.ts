import { execSync } from 'node:child_process';
import { existsSync } from 'node:fs';

let updated = false;

/** Installs a Debian package when `present()` says it is missing. Installing needs root. */
export function ensureDebianPackage(pkg: string, present: () => boolean): void {
  if (present()) return;
  if (process.getuid?.() !== 0) {
    throw new Error(`Debian's '${pkg}' package is missing: run 'apt-get install -y ${pkg}' as root, or run this as root`);
  }
  console.log(`[levelwire] installing Debian package ${pkg} ...`);
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  if (!updated) {
    execSync('apt-get update -qq', { stdio: 'inherit', env });
    updated = true;
  }
  execSync(`apt-get install -y -qq --no-install-recommends ${pkg}`, { stdio: 'inherit', env });
}

/** Debian's chromium for the browser tests; returns its path. */
export function ensureChromium(): string {
  ensureDebianPackage('chromium', () => existsSync('/usr/bin/chromium'));
  return '/usr/bin/chromium';
}
