/** The subset-font package ships no types: the one call scripts/subset-fonts.ts makes. */
declare module 'subset-font' {
  export default function subsetFont(font: Buffer, text: string, options?: { targetFormat?: 'truetype' | 'woff' | 'woff2' | 'sfnt' }): Promise<Buffer>;
}
