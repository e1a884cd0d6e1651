/**
 * The counts beside the navigation's entries, for the signed-in user: open clashes, and
 * apprentice tests waiting for a lead's sign-off. Only the entries the user sees are counted
 * (a technician never asks for the workshop's clashes).
 */
import { QueryTypes } from 'sequelize';
import { navFor, type NavCount, type NavEntry } from '../nav';
import type { SessionUser } from './auth/types';
import { db } from './db';
import { countWaiting } from './services/signoffs';

export type NavCounts = Partial<Record<NavCount, number>>;

const COUNTERS: Record<NavCount, (user: SessionUser) => Promise<number>> = {
	clashes: countOpenClashes,
	signoffs: countWaiting
};

/** `{ clashes: n }` and so on, for each count an entry of `entries` shows. */
export async function navCounts(
	user: SessionUser,
	entries: readonly NavEntry[] = navFor(user.role)
): Promise<NavCounts> {
	const wanted = [...new Set(entries.flatMap((e) => (e.count ? [e.count] : [])))];
	const values = await Promise.all(wanted.map((c) => COUNTERS[c](user)));
	return Object.fromEntries(wanted.map((c, i) => [c, values[i]]));
}

/** Open clashes of the user's workshop (the lead's inbox), by the workshop-and-status key. */
export async function countOpenClashes(user: Pick<SessionUser, 'workshopId'>): Promise<number> {
	const [row] = await db().query<{ n: number | bigint }>(
		"SELECT COUNT(*) AS n FROM conflicts WHERE workshop_id = ? AND status = 'open'",
		{ replacements: [user.workshopId], type: QueryTypes.SELECT }
	);
	return Number(row?.n ?? 0);
}
