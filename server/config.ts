/**
 * Start options, checked once: a bad value throws a ConfigError naming the option and its
 * environment variable, so start-up stops before anything listens.
 */
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

/** Default demo password of the seeded accounts (documented in README; override with AFTERCUE_DEMO_PASSWORD). */
export const DEFAULT_DEMO_PASSWORD = 'aftercue-demo';
export const DEFAULT_PORT = 5170;

export interface StartOptions {
  /** PORT; 0 picks a free port. Default 5170. */
  port?: number;
  /** AFTERCUE_HOST; default 127.0.0.1. */
  host?: string;
  /** AFTERCUE_DATA_DIR: SQLite file + uploads; ':memory:' for an in-memory database. Default ./data. */
  dataDir?: string;
  /** AFTERCUE_DEMO_PASSWORD: password of the seeded demo accounts. */
  demoPassword?: string;
  /** AFTERCUE_PUBLIC_URL: the URL users reach (links in mails); default http://localhost:<port>. */
  publicUrl?: string;
  /** No informational output. */
  quiet?: boolean;
  /** AFTERCUE_SMTP_URL: the lab's relay (smtp:// or smtps://); when set no in-process SMTP server runs. */
  smtpUrl?: string;
  /** AFTERCUE_MAIL_FROM: sender of the product's mails. */
  mailFrom?: string;
  /** bcrypt cost factor; 12 by default, tests pass 4. */
  bcryptCost?: number;
  /** Failed logins (and reset requests) allowed per IP + e-mail in the window. Default 10 per 15 min. */
  loginRateLimit?: { max: number; windowMs: number };
  /** Folder of the built client; default dist/client (served only when it exists). */
  clientDir?: string;
  /**
   * On first start, also train and freeze the demo study's decoder in the background. Default
   * true; an object sizes the demo run instead (tests make it small).
   */
  demoDecoder?: boolean | DemoDecoderSize;
  /** Training jobs run at once, each in its own worker thread. Default 1. */
  trainingConcurrency?: number;
}

/** Size of the demo decoder's calibration run and cross-validation (defaults in server/workers/demo.ts). */
export interface DemoDecoderSize {
  trialsPerClass?: number;
  folds?: number;
  inner?: number;
  components?: number;
}

export interface Config {
  port: number;
  host: string;
  /** null when the database is in memory. */
  dataDir: string | null;
  dbFile: string;
  uploadsDir: string;
  /** True when uploadsDir is a temporary folder to remove at stop. */
  uploadsDirIsTemp: boolean;
  demoPassword: string;
  publicUrl: string | null;
  secureCookies: boolean;
  quiet: boolean;
  smtpUrl: string | null;
  mailFrom: string;
  bcryptCost: number;
  loginRateLimit: { max: number; windowMs: number };
  clientDir: string;
  sessionSecret: string;
  /** false, or the demo run's size overrides ({} for the defaults). */
  demoDecoder: false | DemoDecoderSize;
  trainingConcurrency: number;
}

export class ConfigError extends Error {
  constructor(readonly variable: string, detail: string) {
    super(`Invalid configuration: ${variable} ${detail}`);
    this.name = 'ConfigError';
  }
}

function check(ok: boolean, variable: string, detail: string): void {
  if (!ok) throw new ConfigError(variable, detail);
}

function isInt(v: unknown, min: number, max: number): v is number {
  return typeof v === 'number' && Number.isInteger(v) && v >= min && v <= max;
}

function parseUrl(value: string, variable: string, protocols: string[]): URL {
  let url: URL;
  try { url = new URL(value); } catch { throw new ConfigError(variable, `must be a URL, got '${value}'`); }
  check(protocols.includes(url.protocol), variable, `must use ${protocols.join(' or ')}, got '${url.protocol}'`);
  return url;
}

/** Reads the session secret from the data folder, creating it (0600) the first time. */
function sessionSecretFor(dataDir: string | null): string {
  if (dataDir === null) return randomBytes(48).toString('base64url');
  const file = join(dataDir, 'session-secret');
  if (!existsSync(file)) writeFileSync(file, randomBytes(48).toString('base64url'), { mode: 0o600 });
  return readFileSync(file, 'utf8').trim();
}

/** Validates the options, creates the data folder, and returns the resolved configuration. */
export function resolveConfig(opts: StartOptions): Config {
  const port = opts.port ?? DEFAULT_PORT;
  check(isInt(port, 0, 65535), 'PORT', `must be an integer 0..65535, got '${String(opts.port)}'`);
  const host = opts.host ?? '127.0.0.1';
  check(typeof host === 'string' && /^[A-Za-z0-9.:-]+$/.test(host), 'AFTERCUE_HOST', `must be a host name or address, got '${host}'`);
  const demoPassword = opts.demoPassword ?? DEFAULT_DEMO_PASSWORD;
  check(typeof demoPassword === 'string' && demoPassword.length >= 8 && demoPassword.length <= 72,
    'AFTERCUE_DEMO_PASSWORD', 'must be 8..72 characters');
  const publicUrl = opts.publicUrl ? parseUrl(opts.publicUrl, 'AFTERCUE_PUBLIC_URL', ['http:', 'https:']) : null;
  check(!publicUrl || (publicUrl.search === '' && publicUrl.hash === ''), 'AFTERCUE_PUBLIC_URL', 'must not have a query or fragment');
  if (opts.smtpUrl) parseUrl(opts.smtpUrl, 'AFTERCUE_SMTP_URL', ['smtp:', 'smtps:']);
  const mailFrom = opts.mailFrom ?? 'Aftercue <aftercue@localhost>';
  check(/^[^\r\n]{3,200}$/.test(mailFrom) && mailFrom.includes('@'), 'AFTERCUE_MAIL_FROM', `must be a sender address, got '${mailFrom}'`);
  const bcryptCost = opts.bcryptCost ?? 12;
  check(isInt(bcryptCost, 4, 15), 'bcryptCost', `must be an integer 4..15, got '${String(opts.bcryptCost)}'`);
  const limit = opts.loginRateLimit ?? { max: 10, windowMs: 15 * 60_000 };
  check(isInt(limit.max, 1, 1_000_000) && isInt(limit.windowMs, 1000, 86_400_000), 'loginRateLimit',
    'needs max 1..1e6 and windowMs 1000..86400000');
  const demo = opts.demoDecoder ?? true;
  if (typeof demo === 'object') {
    for (const [k, v] of Object.entries(demo)) check(isInt(v, 1, 1000), `demoDecoder.${k}`, `must be an integer 1..1000, got '${String(v)}'`);
  }
  const trainingConcurrency = opts.trainingConcurrency ?? 1;
  check(isInt(trainingConcurrency, 1, 16), 'trainingConcurrency', `must be an integer 1..16, got '${String(opts.trainingConcurrency)}'`);

  const memory = opts.dataDir === ':memory:';
  const dataDir = memory ? null : resolve(opts.dataDir ?? './data');
  if (dataDir) {
    try { mkdirSync(join(dataDir, 'uploads'), { recursive: true }); }
    catch (e) { throw new ConfigError('AFTERCUE_DATA_DIR', `cannot be created: ${(e as Error).message}`); }
  }
  return {
    port, host, dataDir,
    dbFile: dataDir ? join(dataDir, 'aftercue.sqlite') : ':memory:',
    uploadsDir: dataDir ? join(dataDir, 'uploads') : mkdtempSync(join(tmpdir(), 'aftercue-uploads-')),
    uploadsDirIsTemp: !dataDir,
    demoPassword,
    publicUrl: publicUrl ? publicUrl.href.replace(/\/$/, '') : null,
    secureCookies: publicUrl?.protocol === 'https:',
    quiet: opts.quiet ?? false,
    smtpUrl: opts.smtpUrl || null,
    mailFrom,
    bcryptCost,
    loginRateLimit: limit,
    clientDir: resolve(opts.clientDir ?? fileURLToPath(new URL('../dist/client', import.meta.url))),
    sessionSecret: sessionSecretFor(dataDir),
    demoDecoder: demo === true ? {} : demo,
    trainingConcurrency,
  };
}
