/**
 * The rulebook's pure half (DESIGN §6): the role rules that both sides apply, with the
 * product's words for each refusal. The phone calls them before it saves anything; the
 * server's rulebook (`src/lib/server/services/rules.ts`) calls the very same functions
 * inside every write, whichever channel it came through. Each answers a refusal in words,
 * or null when the role may.
 */
import { isLead, type Role } from './roles';

type Who = { role: Role | string };

/** Job statuses as far as the rules care: closing and reopening. */
const CLOSED = 'closed';

/** The test kinds an apprentice never takes on a hybrid or electric vehicle (every kind, this one included). */
export type TestKind = 'test' | 'reading' | 'spark_test' | 'swap_test' | (string & {});

/**
 * Apprentices do no high-voltage work: no test of any kind on a hybrid or electric vehicle
 * (coil, spark and swap tests, readings and every kind added later).
 */
export function refuseHybridWork(who: Who, hybrid: boolean): string | null {
	if (hybrid && who.role === 'apprentice')
		return 'Apprentices do not work on hybrid or electric vehicles. Ask a qualified technician to take this test.';
	return null;
}

/**
 * Moving a job from one status to another: apprentices never close a job; only a workshop
 * lead or owner reopens a closed one.
 */
export function refuseStatusChange(who: Who, from: string, to: string): string | null {
	if (from === to) return null;
	if (from === CLOSED && !isLead(who)) return 'Only a workshop lead can reopen a closed job';
	if (to === CLOSED && who.role === 'apprentice')
		return 'Only a technician or a workshop lead can close a job';
	return null;
}

/** Who a job is assigned to: technicians and apprentices name only themselves. */
export function refuseAssignee(who: Who & { userId: string }, assigneeId: string | null): string | null {
	if (isLead(who) || assigneeId === who.userId) return null;
	return 'Only a workshop lead can assign a job to someone else';
}

/** Whether someone sees (and so may work on) a job with this assignee: their own, or every job for a lead. */
export function seesJob(who: Who & { userId: string }, job: { assigneeId?: unknown }): boolean {
	return isLead(who) || job.assigneeId === who.userId;
}

/** Sign-offs of apprentice work: workshop leads and owners only. */
export function refuseSignOff(who: Who): string | null {
	return isLead(who) ? null : 'Only a workshop lead or owner can sign off a test';
}
