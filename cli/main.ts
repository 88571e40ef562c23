/**
 * Quasilevel command line: `npm run --silent cli -- <command> [options]`.
 * Each command lives in cli/commands/<name>.ts and exports `run(argv): Promise<number>`
 * (the exit status). Options are parsed with node:util parseArgs in each command.
 * `npm run cli` runs the bundle of this file (build/cli.cjs, see cli/launch.cjs); the same bundle
 * started as a worker thread fits files for `fit` (cli/fit-threads.ts).
 */
import { isMainThread } from 'node:worker_threads';

type CommandModule = { run: (argv: string[]) => Promise<number>; summary: string };

const commands: Record<string, () => Promise<CommandModule>> = {
  fit: () => import('./commands/fit'),
  ni: () => import('./commands/ni'),
  fermi: () => import('./commands/fermi'),
  split: () => import('./commands/split'),
  translate: () => import('./commands/translate'),
  strings: () => import('./commands/strings'),
  characterise: () => import('./commands/characterise'),
  watch: () => import('./commands/watch'),
};

async function main(): Promise<number> {
  const [name, ...rest] = process.argv.slice(2);
  if (!name || name === '--help' || name === '-h' || !(name in commands)) {
    const lines = ['Quasilevel command line', '', 'usage: npm run --silent cli -- <command> [options]', ''];
    for (const [key, load] of Object.entries(commands)) {
      try {
        lines.push(`  ${key.padEnd(10)} ${(await load()).summary}`);
      } catch {
        lines.push(`  ${key.padEnd(10)} (not available in this build)`);
      }
    }
    (name && !(name in commands) ? console.error : console.log)(
      (name && !(name in commands) && name !== '--help' && name !== '-h' ? `unknown command: ${name}\n\n` : '') + lines.join('\n'),
    );
    return name && name !== '--help' && name !== '-h' ? 2 : 0;
  }
  return (await commands[name]()).run(rest);
}

if (isMainThread) {
  main().then(
    (code) => process.exit(code),
    (err: unknown) => {
      console.error(err instanceof Error ? err.message : String(err));
      process.exit(1);
    },
  );
} else {
  void import('./fit-threads').then((m) => m.serveFitWorker());
}
