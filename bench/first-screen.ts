/**
 * The first screen of a cold visit (issue 19): the real server (`server/index.ts` serving dist/)
 * and headless Chromium with a fresh profile for every visit (empty cache), opening /sign-in.
 * Reports, as medians over the visits:
 *  - first contentful paint (the browser's `first-contentful-paint` entry), ms;
 *  - sign-in form usable: the moment the e-mail and password inputs and the button are in the
 *    page, visible and enabled (checked every animation frame from the start of navigation), ms;
 *  - transfer: bytes on the wire of every response of the visit (headers and compressed bodies,
 *    the DevTools protocol's `encodedDataLength`), cold, and again on a reload with the cache warm.
 * Targets: FCP < 800 ms, usable < 1000 ms, transfer < 600 kB (10³ bytes) — benchmark figures
 * for this machine, not a timed test. Reads the existing export: build it first
 * (`npx tsx scripts/build-web.ts`).
 */
import { existsSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { quantile, round } from '@/bench/stats';
import { closeChromium, openBrowser, VIEWPORTS } from '@/tests/support/browser';
import { REPO_ROOT, startServerProcess, WARM_SERVER } from '@/tests/support/server-process';

export const TARGETS = { fcp_ms: 800, usable_ms: 1000, transfer_bytes: 600_000 };

/** Runs in the page before any of its scripts: stamps when the sign-in form can be used. */
const USABLE_PROBE = `(() => {
  const ready = () => {
    const ids = ['email', 'password', 'sign-in-submit'];
    return ids.every((id) => {
      const el = document.querySelector('[data-testid="' + id + '"]');
      if (!el) return false;
      const r = el.getBoundingClientRect();
      return r.width > 0 && r.height > 0 && !el.hasAttribute('disabled') && el.getAttribute('aria-disabled') !== 'true' && getComputedStyle(el).visibility !== 'hidden';
    });
  };
  const tick = () => { if (ready()) { window.__qlUsable = performance.now(); } else requestAnimationFrame(tick); };
  requestAnimationFrame(tick);
})();`;

/** Bytes on the wire while `action` runs (DevTools Network.loadingFinished). */
async function transferDuring(page: Page, action: () => Promise<void>): Promise<{ bytes: number; requests: number; files: { url: string; encoding: string; bytes: number }[] }> {
  const cdp = await page.context().newCDPSession(page);
  await cdp.send('Network.enable');
  let bytes = 0;
  let requests = 0;
  const urls = new Map<string, { url: string; encoding: string }>();
  const files: { url: string; encoding: string; bytes: number }[] = [];
  cdp.on('Network.responseReceived', (e: { requestId: string; response: { url: string; headers: Record<string, string> } }) => {
    const h = e.response.headers;
    urls.set(e.requestId, { url: new URL(e.response.url).pathname, encoding: h['content-encoding'] ?? h['Content-Encoding'] ?? 'identity' });
  });
  cdp.on('Network.loadingFinished', (e: { requestId: string; encodedDataLength: number }) => {
    bytes += e.encodedDataLength;
    requests++;
    const u = urls.get(e.requestId);
    if (u) files.push({ ...u, bytes: e.encodedDataLength });
  });
  await action();
  await page.waitForLoadState('networkidle').catch(() => undefined);
  await cdp.detach();
  return { bytes, requests, files };
}

type Visit = { fcp_ms: number; usable_ms: number; cold_bytes: number; cold_requests: number; warm_bytes: number };
/** What a cold visit fetched, file by file (the last visit's), for the record. */
let lastFiles: { url: string; encoding: string; bytes: number }[] = [];

async function oneVisit(url: string): Promise<Visit> {
  const b = await openBrowser(VIEWPORTS.wide);
  try {
    const page = b.page;
    await page.addInitScript(USABLE_PROBE);
    const cold = await transferDuring(page, async () => {
      await page.goto(`${url}/sign-in`, { waitUntil: 'load' });
      await page.waitForFunction(() => typeof (window as unknown as { __qlUsable?: number }).__qlUsable === 'number', undefined, { timeout: 30_000 });
    });
    const times = await page.evaluate(() => ({
      fcp: performance.getEntriesByName('first-contentful-paint')[0]?.startTime ?? NaN,
      usable: (window as unknown as { __qlUsable: number }).__qlUsable,
    }));
    const warm = await transferDuring(page, async () => {
      await page.reload({ waitUntil: 'load' });
      await page.waitForFunction(() => typeof (window as unknown as { __qlUsable?: number }).__qlUsable === 'number', undefined, { timeout: 30_000 });
    });
    lastFiles = cold.files;
    return { fcp_ms: times.fcp, usable_ms: times.usable, cold_bytes: cold.bytes, cold_requests: cold.requests, warm_bytes: warm.bytes };
  } finally {
    await b.close();
    // A fresh Chromium process for every visit, as a person's first visit has (openBrowser shares one).
    await closeChromium();
  }
}

/** `visits` cold visits (3 with --quick, else 7) after one warm-up visit that is not counted. */
export async function benchFirstScreen({ quick }: { quick: boolean }): Promise<Record<string, unknown>> {
  if (!existsSync(path.join(REPO_ROOT, 'dist', 'index.html'))) {
    console.log('First screen — dist/index.html not found: run `npx tsx scripts/build-web.ts` first');
    return { missing: true };
  }
  const visits = quick ? 3 : 7;
  const srv = await startServerProcess({ timeoutMs: 180_000, env: WARM_SERVER });
  try {
    await oneVisit(srv.url); // the server's first answers (file reads, compression tables) are not a visitor's
    const runs: Visit[] = [];
    for (let k = 0; k < visits; k++) runs.push(await oneVisit(srv.url));
    const m = (k: keyof Visit) => Math.round(quantile(runs.map((r) => r[k]), 0.5));
    const figures = {
      visits,
      fcp_median_ms: m('fcp_ms'),
      usable_median_ms: m('usable_ms'),
      transfer_cold_bytes: m('cold_bytes'),
      requests_cold: m('cold_requests'),
      transfer_warm_reload_bytes: m('warm_bytes'),
      runs,
      files_of_a_cold_visit: lastFiles,
      load_average: os.loadavg().map((x) => round(x, 3)),
      targets: TARGETS,
      ok: m('fcp_ms') < TARGETS.fcp_ms && m('usable_ms') < TARGETS.usable_ms && m('cold_bytes') < TARGETS.transfer_bytes,
    };
    console.log(
      [
        `First screen — cold visit to /sign-in in Chromium, median of ${visits} (load average ${figures.load_average.join(' ')})`,
        `  first contentful paint ${figures.fcp_median_ms} ms (target < ${TARGETS.fcp_ms}), form usable ${figures.usable_median_ms} ms (target < ${TARGETS.usable_ms})`,
        `  transfer ${round(figures.transfer_cold_bytes / 1000)} kB in ${figures.requests_cold} requests (target < ${TARGETS.transfer_bytes / 1000} kB); reload with a warm cache ${round(figures.transfer_warm_reload_bytes / 1000)} kB`,
      ].join('\n'),
    );
    return figures;
  } finally {
    await srv.stop();
  }
}
