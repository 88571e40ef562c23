/**
 * `npm run bench [-- --quick]`: runs each benchmark section in turn and prints its block.
 * Sections return their figures so a later step can store or compare them.
 */
import { benchIvFit } from '@/bench/iv-fit';

type Section = { name: string; run: (opts: { quick: boolean }) => Promise<Record<string, unknown>> };

const sections: Section[] = [{ name: 'iv-fit', run: benchIvFit }];

async function main(): Promise<number> {
  const quick = process.argv.includes('--quick');
  const only = process.argv.find((a) => a.startsWith('--only='))?.slice('--only='.length);
  const results: Record<string, unknown> = {};
  for (const section of sections) {
    if (only && section.name !== only) continue;
    results[section.name] = await section.run({ quick });
    console.log('');
  }
  if (process.argv.includes('--json')) console.log(JSON.stringify(results));
  return 0;
}

main().then(
  (code) => process.exit(code),
  (err: unknown) => {
    console.error(err instanceof Error ? err.stack : String(err));
    process.exit(1);
  },
);
