/**
 * axe-core (the WCAG rules engine, a dev dependency) run inside the page in Chromium.
 * The script goes in through page.evaluate (the DevTools protocol), which the page's CSP
 * (`script-src 'self'`) does not see, so the app's own headers stay as they are.
 */
import { readFileSync } from 'node:fs';
import type { Page } from 'playwright-core';

const AXE_SOURCE = readFileSync(require.resolve('axe-core/axe.min.js'), 'utf8');

export type AxeFinding = { view: string; id: string; impact: string; help: string; targets: string[] };

/** WCAG 2.0/2.1 A and AA rules and axe's best practices (landmarks, one main, headings). */
const TAGS = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'best-practice'];

/** Runs axe over the page (or the part `include` selects); one finding per rule with the elements it named. */
export async function axeFindings(page: Page, view: string, include?: string): Promise<AxeFinding[]> {
  const loaded = await page.evaluate(() => typeof (window as unknown as { axe?: unknown }).axe === 'object');
  if (!loaded) await page.evaluate(AXE_SOURCE);
  const result = await page.evaluate(
    async ({ tags, include }) => {
      const axe = (window as unknown as { axe: { run: (ctx: unknown, opts: unknown) => Promise<{ violations: { id: string; impact: string | null; help: string; nodes: { target: unknown[] }[] }[] }> } }).axe;
      const r = await axe.run(include ? { include: [include] } : document, { runOnly: { type: 'tag', values: tags }, resultTypes: ['violations'] });
      return r.violations.map((v) => ({ id: v.id, impact: v.impact ?? 'unknown', help: v.help, targets: v.nodes.map((n) => String(n.target.join(' '))) }));
    },
    { tags: TAGS, include },
  );
  return result.map((r) => ({ view, ...r }));
}

/** A finding on one line, for test output and the README. */
export function describeFinding(f: AxeFinding): string {
  return `${f.view}: [${f.impact}] ${f.id} — ${f.help} (${f.targets.length}: ${f.targets.slice(0, 3).join(', ')})`;
}
