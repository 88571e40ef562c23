/**
 * Quasilevel's look: warm paper, deep ink, and two signal colours taken from the product's
 * idea — the electron level (teal) and the hole level (amber) that split apart under light.
 */
export const theme = {
  color: {
    paper: '#F4F2EC',
    surface: '#FFFFFF',
    sunken: '#ECE9E0',
    ink: '#111A2E',
    inkSoft: '#3C4760',
    muted: '#5A6275',
    line: '#D9D4C7',
    electron: '#0B6A61',
    electronSoft: '#DCEFEC',
    hole: '#8F5B00',
    holeSoft: '#F8EBCF',
    danger: '#A8261D',
    dangerSoft: '#F8E0DD',
    ok: '#2B6E33',
    okSoft: '#E0EFDF',
    navBg: '#111A2E',
    navText: '#C9CFDC',
    navActive: '#FFFFFF',
  },
  font: {
    regular: 'PlexSans',
    medium: 'PlexSans-Medium',
    semibold: 'PlexSans-SemiBold',
    /** No 700 face is shipped (nothing used it): bold text is set in the semibold face. */
    bold: 'PlexSans-SemiBold',
    mono: 'PlexMono',
    monoBold: 'PlexMono-SemiBold',
  },
  radius: { s: 4, m: 8, l: 14 },
  space: (n: number) => n * 4,
  /** Width from which the layout uses a side navigation and several columns. */
  wideFrom: 1024,
  /** Width from which lists of devices are tables and grids; below it they are cards (phones, narrow windows). */
  tableFrom: 900,
} as const;
