/**
 * Browser: each demo role signs in through the form at phone and wide widths, sees the sections
 * its role allows (and not the others), with the shipped font and nothing cut off; screenshots go
 * to artifacts/screenshots (git-ignored).
 */
import { readDemoAccounts } from '@/server/services/seed';
import { ROLE_LABELS } from '@/lib/auth/roles';
import { layoutProblems, openBrowser, screenshot, signInThroughForm, VIEWPORTS } from '@/tests/support/browser';
import { startServerProcess } from '@/tests/support/server-process';
import type { ServerProcess } from '@/tests/support/server-process';

let srv: ServerProcess;
beforeAll(async () => {
  srv = await startServerProcess();
});
afterAll(async () => {
  await srv?.stop();
});

const accounts = readDemoAccounts();

describe.each(Object.entries(VIEWPORTS))('at %s width', (vpName, viewport) => {
  it('the signed-out page shows the sign-in form in the shipped font', async () => {
    const b = await openBrowser(viewport);
    try {
      await b.page.goto(`${srv.url}/batches`, { waitUntil: 'load' });
      await b.page.getByTestId('sign-in-form').waitFor();
      expect(await b.page.evaluate(() => document.fonts.check('16px PlexSans'))).toBe(true);
      const family = await b.page.getByText('Sign in', { exact: true }).first().evaluate((el) => getComputedStyle(el).fontFamily);
      expect(family).toContain('PlexSans');
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `sign-in-${vpName}`);
      await b.page.getByTestId('email').fill('ada.okafor@kestrel-pv.example');
      await b.page.getByTestId('password').fill('not-the-password');
      await b.page.getByTestId('sign-in-submit').click();
      await b.page.getByTestId('form-error').waitFor();
      expect(await b.page.getByTestId('form-error').innerText()).toMatch(/do not match/i);
    } finally {
      await b.close();
    }
  });

  it.each(accounts.map((a) => [a.role, a] as const))('%s signs in and sees what the role allows', async (role, account) => {
    const b = await openBrowser(viewport);
    try {
      await signInThroughForm(b.page, srv.url, account.email, account.password);
      await b.page.getByText(ROLE_LABELS[role], { exact: false }).first().waitFor();
      const isAdmin = role === 'admin';
      expect(await b.page.getByTestId('nav-users').count()).toBe(isAdmin ? 1 : 0);
      expect(await b.page.getByTestId('nav-outbox').count()).toBe(isAdmin ? 1 : 0);
      expect(await b.page.getByTestId('hv-caution').count()).toBe(1);
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `overview-${role}-${vpName}`);

      if (isAdmin) {
        await b.page.getByTestId('nav-users').click();
        await b.page.getByTestId('users-screen').waitFor();
        for (const a of accounts) await b.page.getByTestId(`user-${a.email}`).waitFor();
        expect(await layoutProblems(b.page)).toEqual([]);
        await screenshot(b.page, `users-admin-${vpName}`);
      } else {
        // Typing the admin address does not open the admin screen for other roles.
        await b.page.goto(`${srv.url}/admin/users`, { waitUntil: 'load' });
        await b.page.getByTestId('overview-screen').waitFor();
        expect(await b.page.getByTestId('users-screen').count()).toBe(0);
      }

      await b.page.goto(`${srv.url}/account`, { waitUntil: 'load' });
      await b.page.getByTestId('account-screen').waitFor();
      expect(await b.page.getByTestId('account-role').innerText()).toBe(ROLE_LABELS[role]);
      await b.page.getByTestId('sign-out').click();
      await b.page.getByTestId('sign-in-form').waitFor();
    } finally {
      await b.close();
    }
  });

  it('an unknown address shows the not-found page', async () => {
    const b = await openBrowser(viewport);
    try {
      const a = accounts.find((x) => x.role === 'designer')!;
      await signInThroughForm(b.page, srv.url, a.email, a.password);
      await b.page.goto(`${srv.url}/no/such/page`, { waitUntil: 'load' });
      await b.page.getByTestId('not-found').waitFor();
      await screenshot(b.page, `not-found-${vpName}`);
    } finally {
      await b.close();
    }
  });
});
