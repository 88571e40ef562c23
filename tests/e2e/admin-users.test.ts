/**
 * Browser: the administrator's users screen at phone and wide widths. A newcomer of the demo
 * domain signs up through the form, opens the verification link from the outbox and waits; the
 * administrator invites someone, approves the newcomer with a role, and changes that role through
 * the confirmation, which names the person and both roles; each change shows in the record.
 */
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { readDemoAccounts } from '@/server/services/seed';
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

const admin = readDemoAccounts().find((a) => a.role === 'admin')!;

/** The verification link mailed to `email`, read from the server's outbox (.eml files, quoted-printable). */
function verificationLink(email: string): string {
  const dir = path.join(srv.dataDir, 'outbox');
  const mails = readdirSync(dir)
    .filter((f) => f.includes('-verify-email-') && f.includes(email))
    .sort();
  if (!mails.length) throw new Error(`no verification mail for ${email}`);
  const text = readFileSync(path.join(dir, mails[mails.length - 1]), 'utf8')
    .replace(/=\r?\n/g, '')
    .replace(/=3D/g, '=');
  const link = text.match(/https?:\/\/\S+\/api\/auth\/verify-email\?\S+/)?.[0];
  if (!link) throw new Error(`no link in the verification mail for ${email}`);
  return link;
}

async function signUpThroughForm(page: Page, name: string, email: string, password: string) {
  await page.goto(`${srv.url}/sign-up`, { waitUntil: 'load' });
  await page.getByTestId('name').fill(name);
  await page.getByTestId('email').fill(email);
  await page.getByTestId('password').fill(password);
  await page.getByTestId('sign-up-submit').click();
  await page.getByTestId('sign-up-check-mail').waitFor({ timeout: 30_000 });
}

describe.each(Object.entries(VIEWPORTS))('at %s width', (vpName, viewport) => {
  it('a newcomer waits; the administrator invites, approves with a role and changes the role after confirming', async () => {
    const newcomer = { name: `Nadia Osei ${vpName}`, email: `nadia.osei.${vpName}@kestrel-pv.example` };
    const invitee = `invited.${vpName}@partner-lab.example`;

    // The newcomer: a weak password is refused with its reason, then sign-up, mail, link, waiting page.
    const nb = await openBrowser(viewport);
    try {
      await nb.page.goto(`${srv.url}/sign-up`, { waitUntil: 'load' });
      await nb.page.getByTestId('name').fill(newcomer.name);
      await nb.page.getByTestId('email').fill(newcomer.email);
      await nb.page.getByTestId('password').fill('password1234');
      await nb.page.getByTestId('sign-up-submit').click();
      await nb.page.getByText(/too easy to guess/).waitFor({ timeout: 30_000 });
      await screenshot(nb.page, `sign-up-weak-password-${vpName}`);
      await signUpThroughForm(nb.page, newcomer.name, newcomer.email, 'tulip-ledger-carbon-41');
      expect(await layoutProblems(nb.page)).toEqual([]);
      await screenshot(nb.page, `sign-up-check-mail-${vpName}`);
      await nb.page.goto(verificationLink(newcomer.email), { waitUntil: 'load' });
      await nb.page.getByTestId('account-waiting').waitFor({ timeout: 20_000 });
      expect(await nb.page.getByTestId('account-waiting-title').innerText()).toBe('Waiting for an administrator');
      expect(await layoutProblems(nb.page)).toEqual([]);
      await screenshot(nb.page, `account-waiting-${vpName}`);
    } finally {
      await nb.close();
    }

    const b = await openBrowser(viewport);
    try {
      const page = b.page;
      await signInThroughForm(page, srv.url, admin.email, admin.password);
      await page.goto(`${srv.url}/admin/users`, { waitUntil: 'load' });
      await page.getByTestId('users-screen').waitFor();

      // Invite with a role.
      await page.getByTestId('invite-email').fill(invitee);
      await page.getByTestId('invite-role-qa_lead').click();
      await page.getByTestId('invite-submit').click();
      await page.getByTestId(`invitation-${invitee}`).waitFor();
      expect(await page.getByTestId(`invitation-${invitee}`).innerText()).toContain('QA lead');

      // Approve the request with a role.
      await page.getByTestId(`request-${newcomer.email}`).waitFor();
      expect(await layoutProblems(page)).toEqual([]);
      await screenshot(page, `users-requests-${vpName}`);
      await page.getByTestId(`request-role-${newcomer.email}-qa_lead`).click();
      await page.getByTestId(`approve-${newcomer.email}`).click();
      await page.getByTestId(`user-${newcomer.email}`).waitFor();
      expect(await page.getByTestId(`request-${newcomer.email}`).count()).toBe(0);
      expect(await page.getByTestId(`role-${newcomer.email}-qa_lead`).getAttribute('aria-checked')).toBe('true');

      // Change the role: the confirmation names the person and both roles; cancelling changes nothing.
      await page.getByTestId(`role-${newcomer.email}-designer`).click();
      const confirm = page.getByTestId(`user-${newcomer.email}`).getByTestId('confirm-change');
      expect(await confirm.innerText()).toContain(`Change the role of ${newcomer.name} from QA lead to Designer?`);
      await screenshot(page, `users-confirm-role-${vpName}`);
      await page.getByTestId(`user-${newcomer.email}`).getByTestId('confirm-no').click();
      expect(await page.getByTestId(`role-${newcomer.email}-qa_lead`).getAttribute('aria-checked')).toBe('true');
      await page.getByTestId(`role-${newcomer.email}-designer`).click();
      await page.getByTestId(`user-${newcomer.email}`).getByTestId('confirm-yes').click();
      await page.waitForFunction(
        (id) => document.querySelector(`[data-testid="${id}"]`)?.getAttribute('aria-checked') === 'true',
        `role-${newcomer.email}-designer`,
      );

      // The record names who did what.
      const record = page.getByTestId('audit-list');
      await record.getByText(`changed the role of ${newcomer.name} (${newcomer.email}) from QA lead to Designer`).waitFor();
      expect(await record.innerText()).toContain(`approved the request of ${newcomer.name} (${newcomer.email}) as QA lead`);
      expect(await record.innerText()).toContain(`invited ${invitee} as QA lead`);
      expect(await layoutProblems(page)).toEqual([]);
      await screenshot(page, `users-admin-after-${vpName}`);
    } finally {
      await b.close();
    }
  });
});
