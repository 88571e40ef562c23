import { Router } from 'express';
import pkg from '@/package.json';

/** GET /api/health — liveness and version; no session needed. */
export function healthRouter(): Router {
  const r = Router();
  r.get('/', (_req, res) => {
    res.json({ ok: true, version: pkg.version, name: 'quasilevel' });
  });
  return r;
}
