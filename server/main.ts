/**
 * `npm start` entry: reads the environment, starts the server, prints where it listens (and the
 * demo accounts on first start), and stops cleanly on SIGINT/SIGTERM.
 *
 * PORT (5170), AFTERCUE_HOST (127.0.0.1), AFTERCUE_DATA_DIR (./data), AFTERCUE_DEMO_PASSWORD
 * ('aftercue-demo'), AFTERCUE_PUBLIC_URL (http://localhost:<port>), AFTERCUE_SMTP_URL (none:
 * in-process SMTP server), AFTERCUE_MAIL_FROM.
 */
import { ConfigError } from './config';
import { start } from './index';

function envPort(): number | undefined {
  const raw = process.env.PORT;
  if (raw === undefined || raw === '') return undefined;
  if (!/^\d+$/.test(raw)) throw new ConfigError('PORT', `must be an integer 0..65535, got '${raw}'`);
  return Number(raw);
}

async function main(): Promise<void> {
  const env = process.env;
  const handle = await start({
    port: envPort(),
    host: env.AFTERCUE_HOST || undefined,
    dataDir: env.AFTERCUE_DATA_DIR || undefined,
    demoPassword: env.AFTERCUE_DEMO_PASSWORD || undefined,
    publicUrl: env.AFTERCUE_PUBLIC_URL || undefined,
    smtpUrl: env.AFTERCUE_SMTP_URL || undefined,
    mailFrom: env.AFTERCUE_MAIL_FROM || undefined,
  });
  console.log(`Aftercue listening on ${handle.url}`);
  console.log(`  data: ${handle.config.dataDir ?? '(in memory)'}`);
  console.log(`  mail: ${handle.mail.smtpPort !== null ? `in-process SMTP on 127.0.0.1:${handle.mail.smtpPort} (see Admin > Outbox)` : 'relay from AFTERCUE_SMTP_URL'}`);
  if (handle.seeded) {
    console.log(`\nFirst start: demo accounts created, password '${handle.seeded.password}':`);
    for (const a of handle.seeded.accounts) console.log(`  ${a.role.padEnd(13)} ${a.email}`);
    console.log(`Demo rig '${handle.seeded.rig.name}' key (shown once): ${handle.seeded.rig.key}`);
    console.log('Research use only; not a medical device.');
  }

  let stopping = false;
  const shutdown = (signal: string) => {
    if (stopping) return;
    stopping = true;
    console.log(`\n${signal}: stopping`);
    handle.stop().then(() => process.exit(0), (err: unknown) => { console.error(err); process.exit(1); });
  };
  process.on('SIGINT', () => shutdown('SIGINT'));
  process.on('SIGTERM', () => shutdown('SIGTERM'));
}

main().catch((err: unknown) => {
  console.error(err instanceof ConfigError ? err.message : err);
  process.exit(1);
});
