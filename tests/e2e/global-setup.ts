import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

/**
 * Browser tests run against the production client bundle, exactly as `npm start` serves it:
 * build it once per test run, before any browser test file starts a server.
 */
export default function setup(): void {
  const root = fileURLToPath(new URL('../..', import.meta.url));
  execFileSync(process.execPath, [fileURLToPath(new URL('../../node_modules/vite/bin/vite.js', import.meta.url)), 'build', '--logLevel', 'warn'],
    { cwd: root, stdio: 'inherit' });
}
