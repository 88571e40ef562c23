/**
 * Browser: the charts people read. On a demo batch the overlay colours only failing and warning
 * curves and says how many of each; on a demo curve the pointer reads V, I and P of the nearest measured point, and
 * the I-V chart downloads as <device>-iv.svg (and .png), at phone and wide width.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { layoutProblems, openBrowser, screenshot, SCREENSHOT_DIR, signInThroughForm, VIEWPORTS } from '@/tests/support/browser';
import { startServerProcess } from '@/tests/support/server-process';
import type { ServerProcess } from '@/tests/support/server-process';
import { theme } from '@/components/theme';

const BATCH = 'KF-C24 incoming cells, lot A-1187';
const DEVICE = 'KF-C24-0001';
const READOUT = /V = (-?[\d.e-]+) V · I = (-?[\d.e-]+) A · P = (-?[\d.e-]+) W/;
/** theme.color.hole and theme.color.danger: the overlay's colours for warning and failing curves. */
const AMBER = theme.color.hole;
const RED = theme.color.danger;

let srv: ServerProcess;
beforeAll(async () => {
  // The server seeds and analyses the demo batches before it answers; on a shared, busy machine that takes a while.
  srv = await startServerProcess({ timeoutMs: 180_000 });
});
afterAll(async () => {
  await srv?.stop();
});

/** Moves the mouse to a fraction of the chart's plotting area and returns the readout's V and I. */
async function hoverAt(page: Page, testID: string, fx: number, fy: number): Promise<{ text: string; v: number; i: number; p: number }> {
  const box = await page.getByTestId(`${testID}-plot`).boundingBox();
  if (!box) throw new Error(`${testID} has no box`);
  // chartStyle.padding: left 58, right 16, top 12, bottom 44.
  const x = box.x + 58 + fx * (box.width - 58 - 16);
  const y = box.y + 12 + fy * (box.height - 12 - 44);
  await page.mouse.move(x, y, { steps: 3 });
  await page.getByTestId(`${testID}-marker`).waitFor();
  const text = await page.getByTestId(`${testID}-readout`).innerText();
  const m = READOUT.exec(text);
  if (!m) throw new Error(`no readout in "${text}"`);
  return { text, v: Number(m[1]), i: Number(m[2]), p: Number(m[3]) };
}

describe.each(Object.entries(VIEWPORTS))('at %s width', (vpName, viewport) => {
  it('overlay colours the failing and warning curves it counts; the I-V chart reads points and downloads', async () => {
    const b = await openBrowser(viewport);
    try {
      await signInThroughForm(b.page, srv.url, 'quinn.mbeki@kestrel-pv.example', 'kestrel-qa-demo');
      await b.page.goto(`${srv.url}/batches`, { waitUntil: 'load' });
      await b.page.getByTestId(`batch-${BATCH}`).click();
      await b.page.getByTestId('overlay-chart').locator('svg').first().waitFor();
      await b.page.getByTestId('overlay-chart').scrollIntoViewIfNeeded();

      // The legend's counts of failing and warning curves are the numbers of red and amber curves drawn.
      const legend = await b.page.getByTestId('overlay-chart-legend').innerText();
      const failing = Number(/(\d+) failing/.exec(legend)?.[1]);
      const warning = Number(/(\d+) with warnings/.exec(legend)?.[1]);
      expect(await b.page.getByTestId('overlay-chart').locator(`path[stroke="${RED}"]`).count()).toBe(failing);
      expect(await b.page.getByTestId('overlay-chart').locator(`path[stroke="${AMBER}"]`).count()).toBe(warning);
      const o = await hoverAt(b.page, 'overlay-chart', 0.3, 0.2);
      expect(o.text).toMatch(/^KF-C24-\d{4}: /);
      expect(await layoutProblems(b.page)).toEqual([]);
      expect(await b.page.getByTestId('overlay-chart-readout').getAttribute('aria-live')).toBe('polite');
      await screenshot(b.page, `charts-overlay-${vpName}`);

      // The table on a wide screen, a card on a phone: either way the device's row opens its curve.
      await b.page.getByTestId(`curve-row-${DEVICE}`).scrollIntoViewIfNeeded();
      await b.page.getByTestId(`curve-row-${DEVICE}`).click();
      await b.page.getByTestId('curve-screen').waitFor();
      await b.page.getByTestId('iv-chart').locator('svg').first().waitFor();
      await b.page.getByTestId('iv-chart').scrollIntoViewIfNeeded();

      // Near Isc (left, high) and near Voc (right, low): the readouts follow the pointer along
      // the curve, and P is V·I (to the 4 figures shown).
      const left = await hoverAt(b.page, 'iv-chart', 0.1, 0.05);
      const right = await hoverAt(b.page, 'iv-chart', 0.95, 0.95);
      expect(left.v).toBeLessThan(right.v);
      expect(left.i).toBeGreaterThan(right.i);
      for (const r of [left, right]) expect(Math.abs(r.p - r.v * r.i)).toBeLessThanOrEqual(Math.max(1e-3 * Math.abs(r.p), 1e-6));
      await screenshot(b.page, `charts-iv-readout-${vpName}`);
      expect(await layoutProblems(b.page)).toEqual([]);

      // SVG: a file named after the device, standalone, with the axis titles and the legend.
      const svgDownload = b.page.waitForEvent('download');
      await b.page.getByTestId('iv-chart-svg').click();
      const svg = await svgDownload;
      expect(svg.suggestedFilename()).toBe(`${DEVICE}-iv.svg`);
      const svgText = readFileSync((await svg.path())!, 'utf8');
      expect(svgText.startsWith('<?xml')).toBe(true);
      expect(svgText).toContain('xmlns="http://www.w3.org/2000/svg"');
      expect(svgText).toContain('Voltage (V)');
      expect(svgText).toContain('Current (A)');
      expect(svgText).toContain('>single diode</text>');

      // PNG: drawn from the same SVG on a canvas.
      const pngDownload = b.page.waitForEvent('download');
      await b.page.getByTestId('iv-chart-png').click();
      const png = await pngDownload;
      expect(png.suggestedFilename()).toBe(`${DEVICE}-iv.png`);
      const bytes = readFileSync((await png.path())!);
      expect(bytes.subarray(0, 8)).toEqual(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]));
      // Kept beside the screenshots, to look at what a person gets.
      await svg.saveAs(path.join(SCREENSHOT_DIR, `charts-download-${vpName}.svg`));
      await png.saveAs(path.join(SCREENSHOT_DIR, `charts-download-${vpName}.png`));
    } finally {
      await b.close();
    }
  });
});
