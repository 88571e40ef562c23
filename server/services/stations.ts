/**
 * Station keys: one better-auth API key (the @better-auth/api-key plugin, table `apikey`) per
 * test station, owned by the organisation (`reference_id`). Each station also has a user row
 * of its own (id = the key's id, never a member, no password: it cannot sign in) so that the
 * batches and curves it sends record it as their author (`created_by`) — a station's uploads
 * are its own, not an administrator's, and do not count against anyone's separation of duties.
 */
import { and, asc, eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { apikey, organization, user } from '@/db/schema';
import type { StationOut } from '@/lib/schemas/stations';
import type { Auth } from '@/server/auth';
import { HttpError } from '@/server/errors';
import type { Caller } from '@/server/permissions';

/**
 * The two plugin endpoints used here. better-auth's inferred `auth.api` type does not carry the
 * plugin's endpoints in this tree (its types are built against better-auth 1.7.5, whose
 * endpoint types differ), so they are typed by hand from the plugin's routes.
 */
type KeyApi = {
  createApiKey: (req: { body: { name: string; organizationId: string; userId: string } }) => Promise<{ id: string; key: string }>;
  verifyApiKey: (req: { body: { key: string } }) => Promise<{ valid: boolean; error: { code?: unknown } | null; key: { id: string; referenceId: string } | null }>;
};
const keyApi = (auth: Auth) => auth.api as unknown as KeyApi;

/** The address of a station's user row: the reserved .invalid domain, so no mail can ever reach anyone. */
const stationEmail = (id: string) => `station-${id.toLowerCase()}@stations.invalid`;

function stationJson(row: { id: string; name: string | null; start: string | null; createdAt: Date; lastRequest: Date | null; enabled: boolean | null }): StationOut {
  return { id: row.id, name: row.name ?? '', key_start: row.start, created_at: row.createdAt, last_used_at: row.lastRequest, revoked: row.enabled === false };
}

const columns = { id: apikey.id, name: apikey.name, start: apikey.start, createdAt: apikey.createdAt, lastRequest: apikey.lastRequest, enabled: apikey.enabled };

/** Creates a station and its key; the answer is the only place the key is ever shown. */
export async function createStation(auth: Auth, db: Db, admin: { userId: string; organizationId: string }, name: string) {
  const created = await keyApi(auth).createApiKey({ body: { name, organizationId: admin.organizationId, userId: admin.userId } });
  await db.insert(user).values({ id: created.id, name, email: stationEmail(created.id), emailVerified: true });
  return { id: created.id, name, key: created.key };
}

/** The organisation's stations, oldest first, revoked ones included. */
export async function listStations(db: Db, organizationId: string): Promise<{ stations: StationOut[] }> {
  const rows = await db.select(columns).from(apikey).where(eq(apikey.referenceId, organizationId)).orderBy(asc(apikey.createdAt), asc(apikey.id));
  return { stations: rows.map(stationJson) };
}

/** Revokes a station's key (kept and listed as revoked); another organisation's station is a 404. */
export async function revokeStation(db: Db, organizationId: string, id: string): Promise<StationOut> {
  const [row] = await db
    .update(apikey)
    .set({ enabled: false, updatedAt: new Date() })
    .where(and(eq(apikey.id, id), eq(apikey.referenceId, organizationId)))
    .returning(columns);
  if (!row) throw new HttpError(404, 'not_found', 'This station was not found.');
  return stationJson(row);
}

/** Words for a refused key; the plugin's codes stay inside. */
function keyProblem(code: string | undefined): string {
  if (code === 'KEY_DISABLED') return 'This station key has been revoked by an administrator. Ask for a new key on the Stations screen.';
  if (code === 'KEY_EXPIRED') return 'This station key has expired. Ask an administrator for a new key.';
  return 'This station key is not valid. Check the key, or ask an administrator for a new one on the Stations screen.';
}

/**
 * The caller behind an `x-api-key`: the station, in its organisation, as a test engineer for the
 * two routes a key may use (server/station-keys.ts). 401 with words for a wrong, revoked or expired
 * key. Checking a key records its use (`last_request`, shown as last use).
 */
export async function stationCaller(auth: Auth, db: Db, key: string): Promise<Caller> {
  const checked = await keyApi(auth).verifyApiKey({ body: { key } });
  if (!checked.valid || !checked.key) throw new HttpError(401, 'invalid_key', keyProblem(checked.error?.code as string | undefined));
  const [row] = await db
    .select({ userId: user.id, userName: user.name, email: user.email, orgId: organization.id, orgName: organization.name, domain: organization.domain })
    .from(user)
    .innerJoin(organization, eq(organization.id, checked.key.referenceId))
    .where(eq(user.id, checked.key.id))
    .limit(1);
  if (!row) throw new HttpError(401, 'invalid_key', keyProblem(undefined));
  return {
    user: { id: row.userId, name: row.userName, email: row.email },
    sessionId: `station:${row.userId}`,
    organization: { id: row.orgId, name: row.orgName, domain: row.domain },
    memberId: '',
    role: 'test_engineer',
    station: { id: row.userId, name: row.userName },
  };
}
