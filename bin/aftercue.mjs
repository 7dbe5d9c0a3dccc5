#!/usr/bin/env node
// Launches the TypeScript CLI through tsx's loader so `aftercue` works without a build step.
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const tsx = import.meta.resolve('tsx');
const main = fileURLToPath(new URL('../cli/main.ts', import.meta.url));
const r = spawnSync(process.execPath, ['--import', tsx, main, ...process.argv.slice(2)], { stdio: 'inherit' });
process.exit(r.status ?? 1);
