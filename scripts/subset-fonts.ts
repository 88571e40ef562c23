/**
 * `npm run fonts`: the web app's copies of the shipped IBM Plex faces, cut down to the characters
 * Quasilevel sets (harfbuzz's hb-subset through the subset-font package) and written to
 * assets/fonts/web/. The full faces stay in assets/fonts/ for the release report PDF, whose text
 * (people's names, batch names) has no fallback font. A browser draws a character the subset lacks
 * in its own fallback face, so the web subset keeps Latin-1, Latin Extended-A, Greek and the
 * symbol blocks the screens use (units, arrows, comparisons, sub- and superscripts), and
 * tests/lib/web-fonts.test.ts checks that every character written in app/, components/ and lib/ is
 * in it. Run again after adding a face or a symbol from a new block; the output is committed.
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import subsetFont from 'subset-font';

const ROOT = path.resolve(__dirname, '..');
export const FONT_DIR = path.join(ROOT, 'assets', 'fonts');
export const WEB_FONT_DIR = path.join(FONT_DIR, 'web');
export const WEB_FACES = ['IBMPlexSans_400Regular', 'IBMPlexSans_500Medium', 'IBMPlexSans_600SemiBold', 'IBMPlexMono_400Regular', 'IBMPlexMono_600SemiBold'];

/** Unicode ranges kept (inclusive). */
export const KEPT_RANGES: [number, number][] = [
  [0x20, 0x7e], // Basic Latin
  [0xa0, 0x17f], // Latin-1 Supplement, Latin Extended-A (names)
  [0x300, 0x30f], // combining accents (x̄)
  [0x370, 0x3ff], // Greek (α β γ κ µ Ω, Δ)
  [0x1d40, 0x1d40], // ᵀ
  [0x2000, 0x206f], // General Punctuation (– — ‘ ’ … ′ ‹ ›)
  [0x2070, 0x209f], // superscripts and subscripts
  [0x2190, 0x21ff], // arrows
  [0x2200, 0x22ff], // mathematical operators (− ≤ ≥ ≈ ∝ √)
  [0x2300, 0x23ff], // miscellaneous technical (⌈ ⌉ ⌊ ⌋)
  [0x2500, 0x257f], // box drawing (legend strokes)
  [0x25a0, 0x25ff], // geometric shapes (▲ ▼ ◆ ● ○)
  [0x2713, 0x2715], // ✓ ✕
];

function keptText(): string {
  let text = '';
  for (const [a, b] of KEPT_RANGES) for (let c = a; c <= b; c++) text += String.fromCodePoint(c);
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
