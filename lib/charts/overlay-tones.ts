/**
 * Which curves the batch overlay colours. Only devices that need a look stand out — failing ones
 * in one colour, ones with a warning in another — and every passing curve is drawn in one
 * neutral grey behind them. Each curve's severity comes from the server (the batch's spec if it
 * has one, else the flags' severities: lib/quality/severity.ts). The legend's counts come from
 * the same function as the colours, so the numbers shown are the numbers of coloured curves.
 */
import type { Severity } from '@/lib/quality/severity';

export type OverlayTone = Severity;

export function overlayTone(c: { severity: Severity }): OverlayTone {
  return c.severity;
}

/** Drawing order: grey first, then warnings, failing curves on top. */
const ORDER: Record<OverlayTone, number> = { pass: 0, warn: 1, fail: 2 };

/** The curves in drawing order (grey first, so the coloured ones are on top) with their tones and counts. */
export function overlayTones<C extends { severity: Severity }>(curves: readonly C[]): { ordered: { curve: C; tone: OverlayTone }[]; counts: Record<OverlayTone, number> } {
  const toned = curves.map((curve) => ({ curve, tone: overlayTone(curve) }));
  const counts: Record<OverlayTone, number> = { pass: 0, warn: 0, fail: 0 };
  for (const t of toned) counts[t.tone] += 1;
  // A stable sort keeps the server's order within one tone.
  const ordered = toned.map((t, k) => ({ t, k })).sort((a, b) => ORDER[a.t.tone] - ORDER[b.t.tone] || a.k - b.k).map((x) => x.t);
  return { ordered, counts };
}
