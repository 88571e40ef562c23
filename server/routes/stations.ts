import { Router } from 'express';
import type { Db } from '@/db/client';
import { stationCreateSchema } from '@/lib/schemas/stations';
import type { Auth } from '@/server/auth';
import { callerOf, requirePermission } from '@/server/permissions';
import { createStation, listStations, revokeStation } from '@/server/services/stations';
import { validate } from '@/server/validate';

/** /api/stations — test stations' keys (administrators). */
export function stationsRouter(auth: Auth, db: Db): Router {
  const r = Router();

  /** GET /api/stations — the organisation's stations: name, created, last use, revoked. */
  r.get('/', requirePermission('station:manage'), async (req, res) => {
    res.json(await listStations(db, callerOf(req).organization.id));
  });

  /** POST /api/stations {name} — a new station and its key, shown in this answer only. */
  r.post('/', requirePermission('station:manage'), validate(stationCreateSchema), async (req, res) => {
    const c = callerOf(req);
    res.status(201).json(await createStation(auth, db, { userId: c.user.id, organizationId: c.organization.id }, req.body.name));
  });

  /** DELETE /api/stations/:id — revoke the station's key (the station stays listed, revoked). */
  r.delete('/:id', requirePermission('station:manage'), async (req, res) => {
    res.json(await revokeStation(db, callerOf(req).organization.id, String(req.params.id)));
  });

  return r;
}
