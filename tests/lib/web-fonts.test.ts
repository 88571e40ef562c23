/**
 * The web app's fonts are subsets of the shipped IBM Plex faces (scripts/subset-fonts.ts). Every
 * character the screens write — any non-ASCII character in the sources of app/, components/ and
 * lib/ — must be in them, or it would be drawn in the browser's fallback face beside Plex.
 */
import path from 'node:path';
import * as fontkit from 'fontkit';
import { KEPT_RANGES, WEB_FACES, WEB_FONT_DIR, writtenCharacters } from '@/scripts/subset-fonts';

describe('web font subsets', () => {
  const written = writtenCharacters();

  it('the screens write characters beyond ASCII (the check below has something to check)', () => {
    for (const ch of ['°', '±', 'Ω', '≥', '−', '…']) expect(written.has(ch.codePointAt(0)!)).toBe(true);
  });

  it.each(WEB_FACES)('%s has a glyph for every character the screens write', (face) => {
    const font = fontkit.openSync(path.join(WEB_FONT_DIR, `${face}.ttf`)) as fontkit.Font;
    const full = fontkit.openSync(path.join(WEB_FONT_DIR, '..', `${face}.ttf`)) as fontkit.Font;
    // A character the full face lacks too is not the subset's fault (the browser falls back either way).
    const missing = [...written]
      .filter(([cp]) => !/\p{Mn}|\uFE0F/u.test(String.fromCodePoint(cp))) // combining marks, emoji selectors: the browser composes them
      .filter(([cp]) => full.hasGlyphForCodePoint(cp) && !font.hasGlyphForCodePoint(cp))
      .map(([cp, file]) => `${String.fromCodePoint(cp)} U+${cp.toString(16).toUpperCase().padStart(4, '0')} (${file})`);
    expect(missing).toEqual([]);
    // And the subset is one: a Cyrillic letter outside the kept ranges is gone.
    expect(full.hasGlyphForCodePoint(0x416)).toBe(true);
    expect(font.hasGlyphForCodePoint(0x416)).toBe(false);
  });

  it('the kept ranges are sorted and do not overlap', () => {
    for (let k = 1; k < KEPT_RANGES.length; k++) expect(KEPT_RANGES[k][0]).toBeGreaterThan(KEPT_RANGES[k - 1][1]);
  });
});
