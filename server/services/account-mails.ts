/**
 * The texts of the account mails: verification, a sign-up with an address that has an account,
 * a request to join (to the administrators), the answer to it, and an invitation. Each returns
 * what `Mailer.send` needs except the address.
 */
import { ROLE_LABELS } from '@/lib/auth/roles';
import { formatDateTime } from '@/lib/format';
import type { Role } from '@/lib/auth/roles';

type MailText = { kind: string; subject: string; text: string };

export function verifyEmailMail(name: string, url: string): MailText {
  return {
    kind: 'verify-email',
    subject: 'Quasilevel: confirm your e-mail address',
    text: [
      `Hello ${name},`,
      '',
      'Open this link within 24 hours to confirm that this address is yours:',
      '',
      url,
      '',
      'Quasilevel shows no data to an account until its address is confirmed.',
      'If you did not create an account, ignore this message.',
    ].join('\n'),
  };
}

export function existingAccountMail(name: string, baseUrl: string): MailText {
  return {
    kind: 'sign-up-existing',
    subject: 'Quasilevel: someone tried to create an account with your address',
    text: [
      `Hello ${name},`,
      '',
      'Someone asked to create a Quasilevel account with this e-mail address, which already has one.',
      'Nothing was changed. If it was you, sign in instead; if you forgot your password, ask for a new one:',
      '',
      `${baseUrl}/sign-in`,
      `${baseUrl}/forgot-password`,
      '',
      'If it was not you, you need not do anything.',
    ].join('\n'),
  };
}

export function joinRequestMail(orgName: string, who: { name: string; email: string }, baseUrl: string): MailText {
  return {
    kind: 'membership-request',
    subject: `Quasilevel: ${who.name} asks to join ${orgName}`,
    text: [
      `${who.name} <${who.email}> confirmed this address and asks to join ${orgName} on Quasilevel.`,
      '',
      'Approve the request with a role, or refuse it, on the users screen:',
      '',
      `${baseUrl}/admin/users`,
      '',
      'Until then this person sees none of the organisation’s data.',
    ].join('\n'),
  };
}

export function requestAnsweredMail(orgName: string, name: string, answer: { approved: true; role: Role } | { approved: false }, baseUrl: string): MailText {
  return answer.approved
    ? {
        kind: 'membership-approved',
        subject: `Quasilevel: you have joined ${orgName}`,
        text: [`Hello ${name},`, '', `An administrator of ${orgName} approved your request. Your role: ${ROLE_LABELS[answer.role]}.`, '', `${baseUrl}/`].join('\n'),
      }
    : {
        kind: 'membership-refused',
        subject: `Quasilevel: your request to join ${orgName}`,
        text: [`Hello ${name},`, '', `An administrator of ${orgName} did not approve your request to join.`, 'If you think this is a mistake, speak to them directly.'].join('\n'),
      };
}

export function invitationMail(orgName: string, inviter: string, role: Role, baseUrl: string, expiresAt: Date): MailText {
  return {
    kind: 'invitation',
    subject: `Quasilevel: ${inviter} invites you to ${orgName}`,
    text: [
      'Hello,',
      '',
      `${inviter} invites you to join ${orgName} on Quasilevel as ${ROLE_LABELS[role]}.`,
      'Create your account with this e-mail address and confirm it; you join as soon as the address is confirmed:',
      '',
      `${baseUrl}/sign-up`,
      '',
      `The invitation is valid until ${formatDateTime(expiresAt, { utc: true })}. If you already have an account with this address, sign in.`,
    ].join('\n'),
  };
}
