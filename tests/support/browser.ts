/**
 * Headless Chromium (Debian's /usr/bin/chromium) driven by playwright-core, with the flags
 * this workplace needs (no sandbox as root, no background networking).
 */
import { existsSync, mkdirSync } from 'node:fs';
import path from 'node:path';
import { chromium } from 'playwright-core';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { REPO_ROOT } from '@/tests/support/server-process';

export const CHROMIUM = process.env.CHROMIUM_PATH || '/usr/bin/chromium';
export const SCREENSHOT_DIR = path.join(REPO_ROOT, 'artifacts', 'screenshots');

export const VIEWPORTS = {
  phone: { width: 390, height: 844 },
  wide: { width: 1440, height: 900 },
} as const;

/**
 * One Chromium process per test file, started on the first openBrowser and ended by
 * closeChromium (tests/e2e/setup.ts, after the file's last test). Each openBrowser gets a browser
 * context of its own — its own cookies, storage and cache, as a new profile would have — so a
 * test starts signed out and unseen; only the ~0.5 s of a process start per test is saved.
 */
let shared: Promise<Browser> | null = null;

function sharedChromium(): Promise<Browser> {
  if (!existsSync(CHROMIUM)) throw new Error(`Chromium not found at ${CHROMIUM}. Install it with: apt-get install -y chromium`);
  shared ??= chromium.launch({
    executablePath: CHROMIUM,
    headless: true,
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
  return shared;
}

/** Ends the shared Chromium (if one was started); the next openBrowser starts another. */
export async function closeChromium(): Promise<void> {
  const b = shared;
  shared = null;
  if (b) await (await b).close();
}

export async function openBrowser(viewport: { width: number; height: number }): Promise<{ context: BrowserContext; page: Page; close: () => Promise<void> }> {
  const browser = await sharedChromium();
  const context = await browser.newContext({ viewport });
  const page = await context.newPage();
  return { context, page, close: () => context.close() };
}

export async function screenshot(page: Page, name: string): Promise<string> {
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  const file = path.join(SCREENSHOT_DIR, `${name}.png`);
  await page.screenshot({ path: file, fullPage: false });
  return file;
}

/** Signs in through the form like a person would. */
export async function signInThroughForm(page: Page, baseUrl: string, email: string, password: string): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`, { waitUntil: 'load' });
  await page.getByTestId('email').fill(email);
  await page.getByTestId('password').fill(password);
  await page.getByTestId('sign-in-submit').click();
  await page.getByTestId('overview-screen').waitFor({ timeout: 20_000 });
}

/** Elements whose text is cut off or that stick out of the viewport horizontally. */
export async function layoutProblems(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const problems: string[] = [];
    const vw = document.documentElement.clientWidth;
    if (document.documentElement.scrollWidth > vw + 1) problems.push(`page scrolls sideways: ${document.documentElement.scrollWidth} > ${vw}`);
    for (const el of Array.from(document.querySelectorAll<HTMLElement>('[dir="auto"]'))) {
      const r = el.getBoundingClientRect();
      if (r.width === 0 || !el.textContent?.trim()) continue;
      const style = getComputedStyle(el);
      const clippedByDesign = style.textOverflow === 'ellipsis' || style.webkitLineClamp !== 'none';
      if (!clippedByDesign && el.scrollWidth > el.clientWidth + 2 && style.overflow !== 'visible') problems.push(`text cut: "${el.textContent.slice(0, 40)}"`);
      if (r.right > vw + 1 && !el.closest('[data-scroll-x]') && !isInHorizontalScroller(el)) problems.push(`off-screen: "${el.textContent.slice(0, 40)}" right=${Math.round(r.right)}`);
    }
    // Text boxes that overlap one another (neither inside the other): what a squashed flex item does.
    const boxes = Array.from(document.querySelectorAll<HTMLElement>('[dir="auto"]'))
      .filter((el) => el.textContent?.trim() && !el.querySelector('[dir="auto"]'))
      .map((el) => ({ el, r: visibleRect(el) }))
      .filter((b) => b.r.width > 0 && b.r.height > 0 && getComputedStyle(b.el).visibility !== 'hidden');
    for (let a = 0; a < boxes.length; a++) {
      for (let b = a + 1; b < boxes.length; b++) {
        const p = boxes[a].r;
        const q = boxes[b].r;
        const dx = Math.min(p.right, q.right) - Math.max(p.left, q.left);
        const dy = Math.min(p.bottom, q.bottom) - Math.max(p.top, q.top);
        if (dx > 3 && dy > 3 && !boxes[a].el.contains(boxes[b].el) && !boxes[b].el.contains(boxes[a].el)) {
          problems.push(`overlap: "${boxes[a].el.textContent!.slice(0, 30)}" / "${boxes[b].el.textContent!.slice(0, 30)}"`);
        }
      }
    }
    return problems;
    /** The part of an element not clipped away by a scrolling or overflow-hidden ancestor. */
    function visibleRect(node: HTMLElement) {
      let { left, top, right, bottom } = node.getBoundingClientRect();
      for (let p = node.parentElement; p; p = p.parentElement) {
        const st = getComputedStyle(p);
        if (st.overflowX !== 'visible' || st.overflowY !== 'visible') {
          const c = p.getBoundingClientRect();
          left = Math.max(left, c.left);
          top = Math.max(top, c.top);
          right = Math.min(right, c.right);
          bottom = Math.min(bottom, c.bottom);
        }
      }
      return { left, top, right, bottom, width: Math.max(0, right - left), height: Math.max(0, bottom - top) };
    }
    function isInHorizontalScroller(node: HTMLElement): boolean {
      for (let p = node.parentElement; p; p = p.parentElement) {
        const s = getComputedStyle(p);
        if ((s.overflowX === 'auto' || s.overflowX === 'scroll') && p.scrollWidth > p.clientWidth) return true;
      }
      return false;
    }
  });
}
