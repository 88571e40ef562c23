/**
 * The guard for station keys (`x-api-key`, server/services/stations.ts), in front of every /api
 * route: a request carrying a key is the station's and may only create a batch
 * (POST /api/batches) or upload curves (POST /api/batches/:id/curves) in the station's
 * organisation. The key is checked first: a wrong or revoked key is 401 with words on any route;
 * a valid key on any other route is 403. Requests without the header pass untouched to the session guard,
 * which lets a station's caller through (`requireSession`).
 */
import type { RequestHandler } from 'express';
import type { Db } from '@/db/client';
import type { Auth } from '@/server/auth';
import { HttpError } from '@/server/errors';
import { stationCaller } from '@/server/services/stations';

/** What a station may do: method and path below /api. */
const STATION_ROUTES: { method: string; path: RegExp }[] = [
  { method: 'POST', path: /^\/batches\/?$/ },
  { method: 'POST', path: /^\/batches\/[^/]+\/curves\/?$/ },
];

export function stationKeys(auth: Auth, db: Db): RequestHandler {
  return async (req, _res, next) => {
    const raw = req.headers['x-api-key'];
    if (raw === undefined) return next();
    const key = Array.isArray(raw) ? raw[0] : raw;
    if (!key) throw new HttpError(401, 'invalid_key', 'The x-api-key header is empty: send the station key there.');
    const caller = await stationCaller(auth, db, key);
    if (!STATION_ROUTES.some((r) => r.method === req.method && r.path.test(req.path))) {
      throw new HttpError(403, 'station_forbidden', `A station key (${caller.station?.name}) may only create batches and upload curves; sign in as a person for anything else.`);
    }
    req.caller = caller;
    next();
  };
}
