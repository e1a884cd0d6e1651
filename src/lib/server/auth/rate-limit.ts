/**
 * Sign-in throttling with the counters in MariaDB (app servers stay stateless).
 * A bucket (`account:<email>` or `address:<ip>`) counts failures in a 15-minute window; at
 * its limit it is blocked for 5 minutes and every attempt answers 429 with the retry time.
 */
import { QueryTypes } from 'sequelize';
import { db } from '../db';

export const WINDOW_MS = 15 * 60_000;
export const BLOCK_MS = 5 * 60_000;
export const LIMITS = { account: 5, address: 20 } as const;

type Bucket = { bucket: string; failures: number; window_start: Date; blocked_until: Date | null };
export const buckets = (email: string, address: string) => [
	{ key: `account:${email.toLowerCase()}`, limit: LIMITS.account },
	{ key: `address:${address}`, limit: LIMITS.address }
];

/** Seconds until the caller may try again, or 0 when not blocked. */
export async function retryAfter(email: string, address: string): Promise<number> {
	const keys = buckets(email, address).map((b) => b.key);
	const rows = await db().query<Bucket>(
		'SELECT * FROM sign_in_throttle WHERE bucket IN (?) AND blocked_until > UTC_TIMESTAMP(3)',
		{ replacements: [keys], type: QueryTypes.SELECT }
	);
	const until = Math.max(0, ...rows.map((r) => new Date(r.blocked_until!).getTime()));
	return until ? Math.max(1, Math.ceil((until - Date.now()) / 1000)) : 0;
}

/** Count a failed attempt against both buckets. */
export async function recordFailure(email: string, address: string): Promise<void> {
	for (const { key, limit } of buckets(email, address)) {
		await db().query(
			`INSERT INTO sign_in_throttle (bucket, failures, window_start, blocked_until)
			 VALUES (?, 1, UTC_TIMESTAMP(3), NULL)
			 ON DUPLICATE KEY UPDATE
			   failures = IF(window_start < UTC_TIMESTAMP(3) - INTERVAL ? SECOND, 1, failures + 1),
			   window_start = IF(window_start < UTC_TIMESTAMP(3) - INTERVAL ? SECOND, UTC_TIMESTAMP(3), window_start),
			   blocked_until = IF(failures >= ?, UTC_TIMESTAMP(3) + INTERVAL ? SECOND, blocked_until)`,
			{
				replacements: [key, WINDOW_MS / 1000, WINDOW_MS / 1000, limit, BLOCK_MS / 1000],
				type: QueryTypes.INSERT
			}
		);
	}
}

/** A successful sign-in clears the account's counter (not the address's). */
export async function clearAccount(email: string): Promise<void> {
	await db().query('DELETE FROM sign_in_throttle WHERE bucket = ?', {
		replacements: [`account:${email.toLowerCase()}`],
		type: QueryTypes.DELETE
	});
}
