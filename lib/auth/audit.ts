/** The membership changes the audit log records, and one sentence for each (the users screen shows them). */
import { isRole, ROLE_LABELS } from '@/lib/auth/roles';

export const AUDIT_ACTIONS = [
  'organisation_founded',
  'joined_by_domain',
  'joined_by_invitation',
  'join_requested',
  'request_approved',
  'request_refused',
  'invited',
  'invitation_canceled',
  'role_changed',
  'deactivated',
  'reactivated',
  'removed',
  'setting_changed',
  'originals_deleted',
] as const;
export type AuditAction = (typeof AUDIT_ACTIONS)[number];

/** One entry as GET /api/audit sends it. */
export type AuditEntryJson = {
  id: string;
  action: AuditAction;
  actor_name: string | null;
  subject_name: string | null;
  subject_email: string | null;
  details: Record<string, string | boolean | null>;
  created_at: string;
};

function roleLabel(v: unknown): string {
  return isRole(v) ? ROLE_LABELS[v] : String(v ?? '?');
}

/** "Who did what": a sentence for people, without the time (the screen shows it beside). */
export function describeAudit(e: AuditEntryJson): string {
  const who = e.actor_name ?? 'Quasilevel';
  const whom = e.subject_name ? `${e.subject_name} (${e.subject_email ?? 'no address'})` : (e.subject_email ?? 'someone');
  const d = e.details;
  switch (e.action) {
    case 'organisation_founded':
      return `${whom} founded the organisation with a verified address and became its administrator.`;
    case 'joined_by_domain':
      return `${whom} joined by e-mail domain as ${roleLabel(d.role)}.`;
    case 'joined_by_invitation':
      return `${whom} joined as ${roleLabel(d.role)} through an invitation.`;
    case 'join_requested':
      return `${whom} verified their address and asked to join.`;
    case 'request_approved':
      return `${who} approved the request of ${whom} as ${roleLabel(d.role)}.`;
    case 'request_refused':
      return `${who} refused the request of ${whom}.`;
    case 'invited':
      return `${who} invited ${whom} as ${roleLabel(d.role)}.`;
    case 'invitation_canceled':
      return `${who} withdrew the invitation of ${whom}.`;
    case 'role_changed':
      return `${who} changed the role of ${whom} from ${roleLabel(d.from_role)} to ${roleLabel(d.to_role)}.`;
    case 'deactivated':
      return `${who} deactivated ${whom}.`;
    case 'reactivated':
      return `${who} reactivated ${whom}.`;
    case 'removed':
      return `${who} removed ${whom} from the organisation.`;
    case 'originals_deleted':
      return `${who} deleted the ${d.files ?? '?'} original file(s) kept of batch ${d.batch_name ?? d.batch_id ?? '?'}.`;
    case 'setting_changed':
      if (d.retention_years !== undefined) return `${who} set the retention of original files to ${d.retention_years} years after release.`;
      if (d.separate_release !== undefined) {
        return d.separate_release
          ? `${who} turned separation of duties at release on: whoever uploaded or submitted a batch may not release it.`
          : `${who} turned separation of duties at release off: the person who uploaded or submitted a batch may release it.`;
      }
      return `${who} turned joining by e-mail domain ${d.join_by_domain ? 'on' : 'off'}.`;
  }
}
