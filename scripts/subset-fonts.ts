/**
 * `npm run fonts`: the web app's copies of the shipped IBM Plex faces, cut down to the characters
 * Quasilevel sets (harfbuzz's hb-subset through the subset-font package) and written to
 * assets/fonts/web/. The full faces stay in assets/fonts/ for the release report PDF, whose text
 * (people's names, batch names) has no fallback font. A browser draws a character the subset lacks
 * in its own fallback face, so the web subset keeps Latin-1, Latin Extended-A (names), the Greek
 * letters, sub- and superscripts, and every character written in app/, components/ and lib/
 * (units, arrows, comparisons, chart marks); tests/lib/web-fonts.test.ts fails when a source
 * writes one the subsets lack: run `npm run fonts` again then. The output is committed.
 */
import { mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import subsetFont from 'subset-font';

const ROOT = path.resolve(__dirname, '..');
export const FONT_DIR = path.join(ROOT, 'assets', 'fonts');
export const WEB_FONT_DIR = path.join(FONT_DIR, 'web');
export const WEB_FACES = ['IBMPlexSans_400Regular', 'IBMPlexSans_500Medium', 'IBMPlexSans_600SemiBold', 'IBMPlexMono_400Regular', 'IBMPlexMono_600SemiBold'];

/** Unicode ranges kept whole (inclusive): letters people's and batch names use, and figures' marks. */
export const KEPT_RANGES: [number, number][] = [
  [0x20, 0x7e], // Basic Latin
  [0xa0, 0x17f], // Latin-1 Supplement, Latin Extended-A (names)
  [0x391, 0x3c9], // Greek capitals and small letters (α β γ κ µ Ω, Δ)
  [0x2070, 0x209f], // superscripts and subscripts
];

function sources(dir: string, out: string[] = []): string[] {
  for (const name of readdirSync(dir)) {
    const full = path.join(dir, name);
    if (statSync(full).isDirectory()) sources(full, out);
    else if (/\.tsx?$/.test(name)) out.push(full);
  }
  return out;
}

/** Characters beyond ASCII written in the screens' sources (app/, components/, lib/), each with a file it is in. */
export function writtenCharacters(): Map<number, string> {
  const found = new Map<number, string>();
  for (const dir of ['app', 'components', 'lib']) {
    for (const file of sources(path.join(ROOT, dir))) {
      for (const ch of readFileSync(file, 'utf8')) {
        const cp = ch.codePointAt(0)!;
        if (cp > 0x7e && !found.has(cp)) found.set(cp, path.relative(ROOT, file));
      }
    }
  }
  return found;
}

function keptText(): string {
  let text = '';
  for (const [a, b] of KEPT_RANGES) for (let c = a; c <= b; c++) text += String.fromCodePoint(c);
  for (const cp of writtenCharacters().keys()) text += String.fromCodePoint(cp);
  return text;
}

async function main() {
  mkdirSync(WEB_FONT_DIR, { recursive: true });
  const text = keptText();
  for (const face of WEB_FACES) {
    const full = readFileSync(path.join(FONT_DIR, `${face}.ttf`));
    // TrueType, not WOFF2: Metro's asset list has .ttf and not .woff2, and the server sends the
    // fonts brotli-compressed, which brings a TrueType subset within a few kB of WOFF2.
    const cut = await subsetFont(full, text, { targetFormat: 'truetype' });
    writeFileSync(path.join(WEB_FONT_DIR, `${face}.ttf`), cut);
    console.log(`${face}: ${full.length} → ${cut.length} bytes`);
  }
}

if (require.main === module) {
  main().catch((err) => {
    console.error(err);
    process.exit(1);
  });
}
