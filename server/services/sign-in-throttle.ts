/**
 * The per-account slow-down of sign-in: after FAILURES_ALLOWED failed sign-ins for one e-mail
 * address within WINDOW_MS, further attempts for that address are refused until the oldest of
 * them leaves the window — whatever client address they come from (the per-client limit in
 * server/auth.ts does not stop a guesser with many addresses). A success clears the count.
 * Unknown addresses are counted the same way, so the answer tells nothing about accounts.
 */
import { and, asc, eq, gt, lte } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { signInFailure } from '@/db/schema';

export const FAILURES_ALLOWED = 5;
export const WINDOW_MS = 15 * 60 * 1000;

/** When `email` may try again, or null when it may now. */
export async function signInBlockedUntil(db: Db, email: string, now = Date.now()): Promise<Date | null> {
  const recent = await db
    .select({ at: signInFailure.createdAt })
    .from(signInFailure)
    .where(and(eq(signInFailure.email, email.toLowerCase()), gt(signInFailure.createdAt, new Date(now - WINDOW_MS))))
    .orderBy(asc(signInFailure.createdAt));
  if (recent.length < FAILURES_ALLOWED) return null;
  // Allowed again once only FAILURES_ALLOWED - 1 failures remain in the window.
  return new Date(recent[recent.length - FAILURES_ALLOWED].at.getTime() + WINDOW_MS);
}

/** Records a failed sign-in and forgets that address's failures older than the window. */
export async function recordSignInFailure(db: Db, email: string, now = Date.now()): Promise<void> {
  const address = email.toLowerCase();
  await db.delete(signInFailure).where(and(eq(signInFailure.email, address), lte(signInFailure.createdAt, new Date(now - WINDOW_MS))));
  await db.insert(signInFailure).values({ id: crypto.randomUUID(), email: address, createdAt: new Date(now) });
}

/** A successful sign-in: the address starts afresh. */
export async function clearSignInFailures(db: Db, email: string): Promise<void> {
  await db.delete(signInFailure).where(eq(signInFailure.email, email.toLowerCase()));
}
