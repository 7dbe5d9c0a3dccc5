// `aftercue` command line. Each file in cli/commands/ exports `register(program)`; adding a
// command is adding a file, so parallel features never edit the same list.
import { readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Command } from 'commander';

interface CommandModule { register(program: Command): void }

async function main(): Promise<void> {
  const program = new Command('aftercue')
    .description('Aftercue: cue-locked EEG decoders and closed-loop pilot sessions (research use only)')
    .showHelpAfterError();
  const dir = join(dirname(fileURLToPath(import.meta.url)), 'commands');
  for (const file of readdirSync(dir).filter((f) => f.endsWith('.ts')).sort()) {
    const mod = (await import(pathToFileURL(join(dir, file)).href)) as CommandModule;
    mod.register(program);
  }
  await program.parseAsync(process.argv);
}

main().catch((err: unknown) => {
  const message = err instanceof Error ? err.message : String(err);
  process.stderr.write(`aftercue: ${message}\n`);
  process.exit(1);
});
