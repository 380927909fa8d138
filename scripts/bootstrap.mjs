// Levelwire's first step for `npm start` and `npm test`: plain Node, no dependencies,
// so it runs on a fresh machine before node_modules exists. It installs the npm
// packages when they are missing or older than package-lock.json.
import { execSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';

const lock = readFileSync('package-lock.json');
const want = createHash('sha256').update(lock).digest('hex');
const stamp = 'node_modules/.levelwire-lock-hash';
const have = existsSync(stamp) ? readFileSync(stamp, 'utf8').trim() : '';

if (have !== want || !existsSync('node_modules/.bin/tsx')) {
  console.log('[levelwire] installing npm packages (npm ci) ...');
  execSync('npm ci --no-audit --no-fund', { stdio: 'inherit' });
  writeFileSync(stamp, want);
}
