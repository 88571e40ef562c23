/**
 * Browser: phone first. At 390 px a QA lead creates a batch with a 60-character name, uploads
 * modules and reads them as cards (no table); opens a curve, whose header names the long batch;
 * compares the demo's single cells with its 60-cell modules one figure at a time (per cell, said
 * in words); and no button on any screen sticks out of the viewport. At 1440 px the same pages
 * keep the table and the grid. Screenshots go to artifacts/screenshots/phone-*.png.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { layoutProblems, openBrowser, screenshot, signInThroughForm, VIEWPORTS } from '@/tests/support/browser';
import { REPO_ROOT, startServerProcess } from '@/tests/support/server-process';
import type { ServerProcess } from '@/tests/support/server-process';
import { theme } from '@/components/theme';

const CELLS = 'KF-C24 incoming cells, lot A-1187';
const MODULES = 'KF-M60 line 2, lot 2611';
/** Demo modules: a good one, the high-Rs one and the bypass-step one (sample-data scenario). */
const FILES = ['M2611-001.csv', 'M2611-009.csv', 'M2611-015.csv'];

let srv: ServerProcess;
let files: string[];
beforeAll(async () => {
  srv = await startServerProcess({ timeoutMs: 180_000 });
  const dir = mkdtempSync(path.join(os.tmpdir(), 'ql-e2e-phone-'));
  files = FILES.map((f) => {
    const to = path.join(dir, f);
    writeFileSync(to, readFileSync(path.join(REPO_ROOT, 'sample-data', 'batches', 'kf-m60-2611', f)));
    return to;
  });
});
afterAll(async () => {
  await srv?.stop();
});

/** A batch name of exactly 60 characters (invented), different per width so the runs do not meet. */
const longName = (vp: string) => `${vp === 'phone' ? 'Phone' : 'Wide'} check: incoming inspection of KF-M60 modules, line 2/lot 2611-rework-A-B-C`.slice(0, 60);

/**
 * Buttons, links, radios and checkboxes whose box sticks out of the viewport sideways (those in a
 * sideways-scrolling strip, such as the phone's section bar or the comparison grid, may).
 */
async function clippedControls(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const vw = document.documentElement.clientWidth;
    const out: string[] = [];
    const inScroller = (el: Element) => {
      for (let p = el.parentElement; p; p = p.parentElement) {
        const s = getComputedStyle(p);
        if ((s.overflowX === 'auto' || s.overflowX === 'scroll') && p.scrollWidth > p.clientWidth) return true;
      }
      return false;
    };
    for (const el of Array.from(document.querySelectorAll('[role="button"], button, a[href], [role="radio"], [role="checkbox"]'))) {
      const r = el.getBoundingClientRect();
      if (r.width === 0 || r.height === 0 || inScroller(el)) continue;
      if (r.left < -1 || r.right > vw + 1) out.push(`"${(el.textContent || el.getAttribute('aria-label') || '').slice(0, 50)}" spans ${Math.round(r.left)}–${Math.round(r.right)} of ${vw}`);
    }
    return out;
  });
}

/** Scrolls the page's scroll view so the element's top is at the top of the screen. */
async function scrollToTop(page: Page, testID: string) {
  await page.getByTestId(testID).first().evaluate((el) => el.scrollIntoView({ block: 'start' }));
}

/** The demo batches' ids, read through the API with the page's session. */
async function batchIds(page: Page): Promise<Record<string, string>> {
  return page.evaluate(async () => {
    const body = (await (await fetch('/api/batches')).json()) as { batches: { id: string; name: string }[] };
    return Object.fromEntries(body.batches.map((b) => [b.name, b.id]));
  });
}

describe.each(Object.entries(VIEWPORTS))('at %s width', (vpName, viewport) => {
  const phone = vpName === 'phone';

  it(phone ? 'device cards, a long batch name in every header, no button outside the screen' : 'the batch table and the curve page header', async () => {
    const b = await openBrowser(viewport);
    try {
      await signInThroughForm(b.page, srv.url, 'quinn.mbeki@kestrel-pv.example', 'kestrel-qa-demo');
      await b.page.goto(`${srv.url}/batches`, { waitUntil: 'load' });
      await b.page.getByTestId('new-batch').click();
      const name = longName(vpName);
      expect(name).toHaveLength(60);
      await b.page.getByTestId('batch-name').fill(name);
      await b.page.getByTestId('batch-submit').click();
      await b.page.getByTestId('upload-panel').waitFor();
      const chooser = b.page.waitForEvent('filechooser');
      await b.page.getByTestId('pick-files').click();
      await (await chooser).setFiles(files);
      await b.page.getByTestId('start-upload').click();
      await b.page.getByTestId('upload-results').waitFor({ timeout: 60_000 });
      await b.page.getByTestId('curve-row-M2611-001').waitFor();

      // Cards on a phone, the table on a wide screen; each device's result in a word.
      expect(await b.page.getByTestId('curve-cards').count()).toBe(phone ? 1 : 0);
      expect(await b.page.getByTestId('curve-table').count()).toBe(phone ? 0 : 1);
      // The bypass-step module fails on its flag (no spec has judged this batch).
      expect(await b.page.getByTestId('result-M2611-015').innerText()).toBe('Fail');
      if (phone) {
        const card = await b.page.getByTestId('curve-row-M2611-015').innerText();
        expect(card).toMatch(/Pmax/);
        expect(card).toMatch(/FF/);
        expect(card).toMatch(/ W/);
        expect(card).toMatch(/ %/);
      }
      // The overlay beside: its legend counts exactly the curves coloured red and amber.
      await b.page.getByTestId('overlay-chart').locator('svg').first().waitFor();
      const legend = await b.page.getByTestId('overlay-chart-legend').innerText();
      const failing = Number(/(\d+) failing/.exec(legend)?.[1]);
      const warning = Number(/(\d+) with warnings/.exec(legend)?.[1]);
      expect(await b.page.getByTestId('overlay-chart').locator('path[stroke="#A8261D"]').count()).toBe(failing);
      expect(await b.page.getByTestId('overlay-chart').locator(`path[stroke="${theme.color.hole}"]`).count()).toBe(warning);
      expect(failing).toBeGreaterThanOrEqual(1);

      await b.page.getByTestId('batch-screen').getByRole('heading').first().evaluate((el) => el.scrollIntoView({ block: 'start' }));
      expect(await clippedControls(b.page)).toEqual([]);
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `phone-batch-header-${vpName}`);
      await scrollToTop(b.page, phone ? 'curve-cards' : 'curve-table');
      expect(await clippedControls(b.page)).toEqual([]);
      await screenshot(b.page, `phone-batch-${phone ? 'cards' : 'table'}-${vpName}`);

      // The curve page's header: the way back names the long batch and stays on the screen.
      await b.page.getByTestId('curve-row-M2611-009').click();
      await b.page.getByTestId('curve-screen').waitFor();
      await b.page.getByTestId('iv-chart').locator('svg').first().waitFor();
      expect(await b.page.getByTestId('to-batch').getAttribute('aria-label')).toBe(`Back to batch ${name}`);
      for (const id of ['to-batch', 'to-physics']) {
        const box = (await b.page.getByTestId(id).boundingBox())!;
        expect(box.x).toBeGreaterThanOrEqual(0);
        expect(box.x + box.width).toBeLessThanOrEqual(viewport.width);
      }
      expect(await clippedControls(b.page)).toEqual([]);
      expect(await layoutProblems(b.page)).toEqual([]);
      await b.page.getByTestId('curve-screen').getByRole('heading').first().evaluate((el) => el.scrollIntoView({ block: 'start' }));
      await screenshot(b.page, `phone-curve-header-${vpName}`);

      // Every other section's header and buttons, with the long batch among the batches.
      for (const [route, testID] of [
        ['/batches', 'batches-screen'],
        ['/specs', 'specs-screen'],
        ['/physics', 'physics-screen'],
        ['/strings', 'strings-screen'],
        ['/account', 'account-screen'],
        ['/', 'overview-screen'],
      ] as const) {
        await b.page.goto(`${srv.url}${route}`, { waitUntil: 'load' });
        await b.page.getByTestId(testID).waitFor();
        expect([route, await clippedControls(b.page)]).toEqual([route, []]);
      }
      await b.page.goto(`${srv.url}/batches`, { waitUntil: 'load' });
      await b.page.getByTestId(`batch-${name}`).waitFor();
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `phone-batches-${vpName}`);

      // A spec with a 60-character name (invented): its page's header and "Change limits".
      const specName = `${name.slice(0, 40)} release spec, version A`.slice(0, 60);
      const specId = await b.page.evaluate(async (n) => {
        const res = await fetch('/api/specs', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ name: n, limits: { pmp_w: { min: 300 } } }) });
        return ((await res.json()) as { id: string }).id;
      }, specName);
      await b.page.goto(`${srv.url}/specs/${specId}`, { waitUntil: 'load' });
      await b.page.getByTestId('spec-screen').waitFor();
      await b.page.getByTestId('edit-spec').waitFor();
      expect(await clippedControls(b.page)).toEqual([]);
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `phone-spec-header-${vpName}`);
    } finally {
      await b.close();
    }
  });

  it(phone ? 'compares cells with modules one figure at a time, per cell, in words' : 'compares cells with modules in the grid, per cell, in words', async () => {
    const b = await openBrowser(viewport);
    try {
      await signInThroughForm(b.page, srv.url, 'quinn.mbeki@kestrel-pv.example', 'kestrel-qa-demo');
      const ids = await batchIds(b.page);
      await b.page.goto(`${srv.url}/compare?batches=${ids[CELLS]},${ids[MODULES]}&param=voc_v`, { waitUntil: 'load' });
      await b.page.getByTestId('kinds-note').waitFor();
      expect(await b.page.getByTestId('kinds-note').innerText()).toMatch(/single cells.*60-cell modules.*compared per cell/s);
      if (phone) {
        expect(await b.page.getByTestId('compare-grid').count()).toBe(0);
        expect(await b.page.getByTestId('stats-table').count()).toBe(0);
        const cells = await b.page.getByTestId(`compare-batch-${CELLS}`).innerText();
        const modules = await b.page.getByTestId(`compare-batch-${MODULES}`).innerText();
        expect(cells).toMatch(/single cells/);
        expect(modules).toMatch(/60-cell modules/);
        expect(modules).toMatch(/Voc per cell mean/);
        // A module's Voc per cell is a cell's size, 0.6–0.75 V (common practice), not 60 times it.
        const mean = Number(/Voc per cell mean\s+([\d.]+) V/.exec(modules)?.[1]);
        expect(mean).toBeGreaterThan(0.6);
        expect(mean).toBeLessThan(0.75);
        expect(await b.page.getByTestId(`difference-${MODULES}`).innerText()).toMatch(/Voc per cell/);
      } else {
        await b.page.getByTestId('compare-grid').waitFor();
        expect(await b.page.getByTestId('param-view').count()).toBe(0);
        expect(await b.page.getByTestId('stats-table').innerText()).toMatch(/Voc per cell/);
        expect(await b.page.getByTestId('differences').innerText()).toMatch(/Voc per cell/);
      }
      expect(await clippedControls(b.page)).toEqual([]);
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `phone-compare-voc-${vpName}`);
      await scrollToTop(b.page, phone ? `compare-batch-${CELLS}` : 'stats-table');
      await screenshot(b.page, `phone-compare-view-${vpName}`);

      // Another figure: Isc is compared as measured, and the words say why.
      await b.page.getByTestId('param-isc_a').click();
      await b.page.waitForURL((u) => u.searchParams.get('param') === 'isc_a');
      await b.page.getByText(/Isc does not depend on the cells in series/).waitFor();
      if (phone) {
        await scrollToTop(b.page, `compare-batch-${CELLS}`);
        await screenshot(b.page, `phone-compare-isc-${vpName}`);
        // The grid stays one tap away.
        await b.page.getByTestId('show-grid').click();
        await b.page.getByTestId('compare-grid').waitFor();
        await scrollToTop(b.page, 'compare-grid');
        expect(await clippedControls(b.page)).toEqual([]);
        await screenshot(b.page, `phone-compare-grid-${vpName}`);
      }
    } finally {
      await b.close();
    }
  });
});
