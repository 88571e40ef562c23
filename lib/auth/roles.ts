/**
 * Quasilevel's roles and what each may do. One table, read by the server (which enforces it)
 * and by the screens (which only decide what to show).
 */
export const ROLES = ['test_engineer', 'designer', 'qa_lead', 'admin'] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  test_engineer: 'Test engineer',
  designer: 'Designer',
  qa_lead: 'QA lead',
  admin: 'Administrator',
};

/** Resource → actions. Keep names short: they appear in /api/me as `resource:action`. */
export const STATEMENTS = {
  batch: ['read', 'write', 'submit'],
  spec: ['read', 'write'],
  release: ['decide'],
  physics: ['use'],
  users: ['manage'],
  outbox: ['read'],
  archive: ['manage'],
  station: ['manage'],
} as const;

export type Resource = keyof typeof STATEMENTS;
export type Permission = { [R in Resource]: `${R}:${(typeof STATEMENTS)[R][number]}` }[Resource];

export const ROLE_PERMISSIONS: Record<Role, readonly Permission[]> = {
  test_engineer: ['batch:read', 'batch:write', 'batch:submit', 'spec:read', 'physics:use'],
  designer: ['batch:read', 'spec:read', 'physics:use'],
  qa_lead: ['batch:read', 'batch:write', 'batch:submit', 'spec:read', 'spec:write', 'release:decide', 'physics:use'],
  admin: ['batch:read', 'spec:read', 'physics:use', 'users:manage', 'outbox:read', 'archive:manage', 'station:manage'],
};

export function isRole(value: unknown): value is Role {
  return typeof value === 'string' && (ROLES as readonly string[]).includes(value);
}

/** True when `role` grants `permission`. */
export function can(role: Role | null | undefined, permission: Permission): boolean {
  return !!role && ROLE_PERMISSIONS[role].includes(permission);
}
