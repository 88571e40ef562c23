/**
 * Browser, keyboard only: the release flow of release.test.ts walked with Tab, Shift+Tab, Enter,
 * Space and typing — sign in, open the lot from the navigation, submit it for review (test
 * engineer), choose the spec, open the release confirmation, write the comment and confirm (QA
 * lead). Every element reached shows a focus ring (an outline of at least 2 px), and the first
 * stops on a signed-in page are the navigation, before the screen's content.
 * Only the spec the lot is judged against is written with the mouse, as set-up.
 */
import type { Page } from 'playwright-core';
import { openBrowser, screenshot, signInThroughForm, VIEWPORTS } from '@/tests/support/browser';
import { startServerProcess } from '@/tests/support/server-process';
import type { ServerProcess } from '@/tests/support/server-process';

const QA = { email: 'quinn.mbeki@kestrel-pv.example', password: 'kestrel-qa-demo' };
const TE = { email: 'tomas.reyes@kestrel-pv.example', password: 'kestrel-test-demo' };
const LOT = 'KF-M60 line 2, lot 2611';

let srv: ServerProcess;
beforeAll(async () => {
  srv = await startServerProcess();
  const b = await openBrowser(VIEWPORTS.wide);
  try {
    await signInThroughForm(b.page, srv.url, QA.email, QA.password);
    await b.page.goto(`${srv.url}/specs`, { waitUntil: 'load' });
    await b.page.getByTestId('new-spec').click();
    await b.page.getByTestId('spec-name').fill('Line release');
    await b.page.getByTestId('limit-pmp_w-min').fill('300');
    await b.page.getByTestId('spec-save').click();
    await b.page.getByTestId('spec-screen').waitFor();
  } finally {
    await b.close();
  }
});
afterAll(async () => {
  await srv?.stop();
});

/** The focused element's test id (its own or its nearest ancestor's), and its outline width in px. */
async function focused(page: Page): Promise<{ id: string | null; outline: number; tag: string }> {
  return page.evaluate(() => {
    const el = document.activeElement as HTMLElement | null;
    if (!el || el === document.body) return { id: null, outline: 0, tag: 'body' };
    const st = getComputedStyle(el);
    const outline = st.outlineStyle === 'none' ? 0 : parseFloat(st.outlineWidth) || 0;
    return { id: el.closest('[data-testid]')?.getAttribute('data-testid') ?? null, outline, tag: el.tagName.toLowerCase() };
  });
}

/** Presses Tab until the element with `testId` has the focus (at most `max` presses); checks its focus ring. */
async function tabTo(page: Page, testId: string, max = 250): Promise<number> {
  for (let n = 1; n <= max; n++) {
    await page.keyboard.press('Tab');
    const f = await focused(page);
    if (f.id === testId) {
      expect({ testId, outline: f.outline >= 2 }).toEqual({ testId, outline: true });
      return n;
    }
  }
  throw new Error(`${testId} not reached with ${max} Tab presses`);
}

/** Signs in with the keyboard alone: Tab to each field, type, Enter in the password field. */
async function signInWithKeyboard(page: Page, who: { email: string; password: string }) {
  await page.goto(`${srv.url}/sign-in`, { waitUntil: 'load' });
  await page.getByTestId('email').waitFor();
  await tabTo(page, 'email');
  await page.keyboard.type(who.email);
  await tabTo(page, 'password');
  await page.keyboard.type(who.password);
  await page.keyboard.press('Enter');
  await page.getByTestId('overview-screen').waitFor({ timeout: 20_000 });
}

/** From the overview, Batches in the navigation, then the lot in the list. */
async function openLotWithKeyboard(page: Page) {
  // The navigation comes first: Overview is among the first stops, the screen's content after it.
  expect(await tabTo(page, 'nav-home', 5)).toBeLessThanOrEqual(5);
  await tabTo(page, 'nav-batches', 3);
  await page.keyboard.press('Enter');
  await page.getByTestId(`batch-${LOT}`).waitFor();
  await tabTo(page, `batch-${LOT}`);
  await page.keyboard.press('Enter');
  await page.getByTestId('review-panel').waitFor();
}

it('submit, release confirmation and confirm with the keyboard alone', async () => {
  const te = await openBrowser(VIEWPORTS.wide);
  try {
    await signInWithKeyboard(te.page, TE);
    await openLotWithKeyboard(te.page);
    await tabTo(te.page, 'review-comment');
    await te.page.keyboard.type('Lot complete, two known defects.');
    await tabTo(te.page, 'submit-review', 5);
    await screenshot(te.page, 'keyboard-submit-focus-wide');
    await te.page.keyboard.press('Enter');
    await te.page.locator('[data-testid="state-in_review"]:visible').first().waitFor();
  } finally {
    await te.close();
  }

  const qa = await openBrowser(VIEWPORTS.wide);
  try {
    const page = qa.page;
    await signInWithKeyboard(page, QA);
    await openLotWithKeyboard(page);
    await tabTo(page, 'spec-choice-Line release');
    await page.keyboard.press('Space');
    await page.getByTestId('evaluation').waitFor();
    await tabTo(page, 'release');
    await page.keyboard.press('Enter');
    const dialog = page.getByTestId('release-dialog');
    await dialog.waitFor();
    // The dialog holds the focus: Tab goes round its own controls.
    await tabTo(page, 'release-comment', 20);
    await page.keyboard.type('Two modules to rework; the lot ships without them.');
    await tabTo(page, 'release-confirm', 20);
    await screenshot(page, 'keyboard-release-confirm-focus-wide');
    await page.keyboard.press('Enter');
    await page.locator('[data-testid="state-released"]:visible').first().waitFor();
    await dialog.waitFor({ state: 'detached' });
    // The record is fetched again after the release; its answer may come a moment after the state's.
    await page.getByTestId('review-record').getByText(/released/).first().waitFor();
    expect(await page.getByTestId('review-record').innerText()).toMatch(/Quinn Mbeki released[\s\S]*22 pass, 2 fail[\s\S]*Two modules to rework/);
  } finally {
    await qa.close();
  }
});
