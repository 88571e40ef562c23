import { Router } from 'express';
import type { Db } from '@/db/client';

/** /api/physics — being built (issue in progress); answers 404 until then. */
export function physicsRouter(_db: Db): Router {
  return Router();
}
