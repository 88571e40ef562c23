/**
 * Which route files the entry loads before the router draws (lib/route-files.ts, index.ts): the
 * screen that matches the address and the layouts above it, checked against the real app folder
 * listed the way the router's file context lists it (`./(auth)/sign-in.tsx`).
 */
import { readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { routeFilesFor } from '@/lib/route-files';

const APP = path.resolve(__dirname, '..', '..', 'app');

function list(dir: string, prefix = '.'): string[] {
  return readdirSync(dir)
    .sort()
    .flatMap((name) => (statSync(path.join(dir, name)).isDirectory() ? list(path.join(dir, name), `${prefix}/${name}`) : [`${prefix}/${name}`]));
}

const KEYS = list(APP);

it.each([
  ['/sign-in', ['./_layout.tsx', './(auth)/_layout.tsx', './(auth)/sign-in.tsx']],
  ['/', ['./_layout.tsx', './(app)/_layout.tsx', './(app)/index.tsx']],
  ['/batches', ['./_layout.tsx', './(app)/_layout.tsx', './(app)/batches/index.tsx']],
  ['/batches/', ['./_layout.tsx', './(app)/_layout.tsx', './(app)/batches/index.tsx']],
  ['/batches/4f1c-22', ['./_layout.tsx', './(app)/_layout.tsx', './(app)/batches/[batchId].tsx']],
  ['/curves/abc?tab=fit', ['./_layout.tsx', './(app)/_layout.tsx', './(app)/curves/[curveId].tsx']],
  ['/admin/users', ['./_layout.tsx', './(app)/_layout.tsx', './(app)/admin/_layout.tsx', './(app)/admin/users.tsx']],
  ['/physics', ['./_layout.tsx', './(app)/_layout.tsx', './(app)/physics.tsx']],
])('%s → its screen and the layouts above it, outermost first', (pathname, expected) => {
  expect(routeFilesFor(KEYS, pathname)).toEqual(expected);
});

it('an address no screen answers loads nothing ahead (the router shows its not-found screen)', () => {
  expect(routeFilesFor(KEYS, '/no/such/place')).toEqual([]);
  expect(routeFilesFor(KEYS, '/batches/a/b')).toEqual([]);
});

it('a literal segment wins over a parameter, a parameter over a catch-all', () => {
  const keys = ['./_layout.tsx', './items/[id].tsx', './items/new.tsx', './items/[...rest].tsx'];
  expect(routeFilesFor(keys, '/items/new')).toEqual(['./_layout.tsx', './items/new.tsx']);
  expect(routeFilesFor(keys, '/items/7')).toEqual(['./_layout.tsx', './items/[id].tsx']);
  expect(routeFilesFor(keys, '/items/7/8')).toEqual(['./_layout.tsx', './items/[...rest].tsx']);
});
