// Browser tests drive Debian's Chromium through playwright-core; nothing is downloaded but the
// Debian package. Installs it when missing and we are root, otherwise stops with the command.
import { existsSync } from 'node:fs';
import { execSync } from 'node:child_process';

const CHROMIUM = process.env.AFTERCUE_CHROMIUM ?? '/usr/bin/chromium';
const INSTALL = 'apt-get update && apt-get install -y chromium';

if (existsSync(CHROMIUM)) process.exit(0);
if (typeof process.getuid === 'function' && process.getuid() === 0) {
  console.log(`Chromium not found at ${CHROMIUM}; installing Debian's package: ${INSTALL}`);
  execSync(INSTALL, { stdio: 'inherit', env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } });
  if (existsSync(CHROMIUM)) process.exit(0);
}
console.error(`Browser tests need Debian's Chromium at ${CHROMIUM}. Install it with:\n  sudo ${INSTALL}`);
process.exit(1);
