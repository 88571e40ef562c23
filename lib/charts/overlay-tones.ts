/**
 * Which curves the batch overlay colours. Only devices that need a look stand out; every other
 * curve is drawn in one neutral grey behind them. The legend's counts come from the same
 * function as the colours, so the number shown is the number of coloured curves.
 */

export type OverlayTone = 'flagged' | 'other';

export function overlayTone(c: { flagged: boolean }): OverlayTone {
  return c.flagged ? 'flagged' : 'other';
}

/** The curves in drawing order (grey first, so the coloured ones are on top) with their tones and counts. */
export function overlayTones<C extends { flagged: boolean }>(curves: readonly C[]): { ordered: { curve: C; tone: OverlayTone }[]; counts: Record<OverlayTone, number> } {
  const toned = curves.map((curve) => ({ curve, tone: overlayTone(curve) }));
  const counts: Record<OverlayTone, number> = { flagged: 0, other: 0 };
  for (const t of toned) counts[t.tone] += 1;
  const ordered = [...toned.filter((t) => t.tone === 'other'), ...toned.filter((t) => t.tone !== 'other')];
  return { ordered, counts };
}
