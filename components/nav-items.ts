import type { Href } from 'expo-router';
import type { Permission } from '@/lib/auth/roles';

/** `href` is checked against the app's routes (typed routes, .expo/types/router.d.ts). */
export type NavItem = { href: Href; label: string; short: string; needs?: Permission; match: string };

/** The main sections, in order; each shows only to roles with its permission. */
export const NAV_ITEMS: NavItem[] = [
  { href: '/', label: 'Overview', short: 'Home', match: '/' },
  { href: '/batches', label: 'Batches', short: 'Batches', needs: 'batch:read', match: '/batches' },
  { href: '/compare', label: 'Compare batches', short: 'Compare', needs: 'batch:read', match: '/compare' },
  { href: '/specs', label: 'Acceptance specs', short: 'Specs', needs: 'spec:read', match: '/specs' },
  { href: '/setups', label: 'Measurement setups', short: 'Setups', needs: 'spec:read', match: '/setups' },
  { href: '/physics', label: 'Device physics', short: 'Physics', needs: 'physics:use', match: '/physics' },
  { href: '/strings', label: 'String sizing', short: 'Strings', needs: 'physics:use', match: '/strings' },
  { href: '/admin/users', label: 'Users & roles', short: 'Users', needs: 'users:manage', match: '/admin/users' },
  { href: '/admin/stations', label: 'Test stations', short: 'Stations', needs: 'station:manage', match: '/admin/stations' },
  { href: '/admin/outbox', label: 'Outbox', short: 'Outbox', needs: 'outbox:read', match: '/admin/outbox' },
  { href: '/account', label: 'Account', short: 'Account', match: '/account' },
];
