/** fontkit ships no types: what tests/lib/web-fonts.test.ts reads of a font. */
declare module 'fontkit' {
  export type Font = { familyName: string; hasGlyphForCodePoint: (codePoint: number) => boolean };
  export function openSync(file: string): Font | { fonts: Font[] };
}
