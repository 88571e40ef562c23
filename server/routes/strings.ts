import { Router } from 'express';
import type { Db } from '@/db/client';

/** /api/strings — being built (issue in progress); answers 404 until then. */
export function stringsRouter(_db: Db): Router {
  return Router();
}
