/**
 * The rulebook's pure half (DESIGN §6): the role rules that both sides apply, with the
 * product's words for each refusal. The phone calls them before it saves anything; the
 * server's rulebook (`src/lib/server/services/rules.ts`) calls the very same functions
 * inside every write, whichever channel it came through. Each answers a refusal in words,
 * or null when the role may.
 */
import { isLead, type Role } from './roles';
import { isSignedOff, type SignOffDecision, type SignOffKind } from './tests/signoff';

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

/**
 * Signing off apprentice work, or sending it back: workshop leads and owners only; only a
 * test an apprentice started needs it (`test`, when known: whether it needs one and where it
 * stands); a signed test is not signed again, nor a test waiting for the apprentice sent
 * back again.
 */
export function refuseSignOff(
	who: Who,
	test?: { needsSignOff: boolean; signOff: SignOffKind },
	decision: SignOffDecision = 'signed'
): string | null {
	if (!isLead(who))
		return decision === 'signed'
			? 'Only a workshop lead or owner can sign off a test'
			: 'Only a workshop lead or owner can send a test back';
	if (!test) return null;
	if (!test.needsSignOff) return 'Only a test done by an apprentice needs a sign-off';
	if (test.signOff === 'not_needed') return 'This test was abandoned, so there is nothing to sign off';
	if (decision === 'signed' && test.signOff === 'signed') return 'This test is already signed off';
	if (decision === 'sent_back' && test.signOff === 'sent_back')
		return 'This test is already sent back and waits for the apprentice';
	return null;
}

/** A test of a job as the closing rules read it. */
export type ClosingTest = {
	id: string;
	partNumber: string | null;
	/** The cylinders or coil positions it covers. */
	positions: string[];
	state: string;
	/** The first test this one re-tests after the repair (null: a first test). */
	retestOf: string | null;
	signOff: SignOffKind;
	/**
	 * Checks read (one per check and position, the latest reading of each), and how many of
	 * those the workshop judged under or over spec.
	 */
	readings: number;
	outOfSpec: number;
};
/**
 * What a job's status rules read: its live tests (oldest first), its open clashes and its
 * circuit tests (battery, charging, …) with their sign-off (`tests/circuit-signoff.ts`; a
 * phone that does not hold them leaves them out and the server checks again).
 */
export type JobFacts = {
	tests: ClosingTest[];
	openClashes: number;
	circuits?: { id: string; signOff: SignOffKind; replaced: boolean }[];
};

const partOf = (t: ClosingTest) =>
	`${t.partNumber ?? 'the part'}${t.positions.length ? ` (${t.positions.length > 1 ? 'cylinders' : 'cylinder'} ${t.positions.join(', ')})` : ''}`;

/**
 * "Re-tested OK" needs a finished re-test after the repair — a test started with Re-test
 * from the first test of the same part and positions — and the latest re-test of each part
 * reads nothing out of spec. Said in one sentence.
 */
export function refuseRetestedOk(f: JobFacts): string | null {
	const retests = f.tests.filter((t) => t.retestOf && t.state !== 'abandoned');
	if (!retests.length)
		return 'Re-tested OK needs a re-test after the repair: open the first test of the repaired part and press Re-test.';
	const latest = new Map<string, ClosingTest>();
	for (const t of retests) if (t.state === 'done' && t.readings > 0) latest.set(t.retestOf!, t);
	if (!latest.size) return `Finish the re-test of ${partOf(retests[retests.length - 1])} first.`;
	const bad = [...latest.values()].find((t) => t.outOfSpec > 0);
	if (bad) return `The re-test of ${partOf(bad)} still reads out of spec, so the job is not re-tested OK.`;
	return null;
}

/**
 * "Closed" needs no open clash on the job (the job itself or its tests) and every test an
 * apprentice did signed off. What is missing is said in one sentence.
 */
export function refuseClose(f: JobFacts): string | null {
	const unsigned =
		f.tests.filter((t) => !isSignedOff(t.signOff)).length +
		(f.circuits ?? []).filter((c) => !c.replaced && !isSignedOff(c.signOff)).length;
	const missing: string[] = [];
	const n = (k: number, one: string, many: string) => (k === 1 ? `one ${one}` : `${k} ${many}`);
	if (f.openClashes)
		missing.push(`${n(f.openClashes, 'clash on it is', 'clashes on it are')} still open in the clash inbox`);
	if (unsigned)
		missing.push(`${n(unsigned, 'test by an apprentice is', 'tests by an apprentice are')} not signed off yet`);
	return missing.length ? `The job cannot be closed yet: ${missing.join(' and ')}.` : null;
}

/** The closing rules of a move to `to` (other statuses have none). */
export function refuseStatusFacts(to: string, f: JobFacts): string | null {
	if (to === 'retested_ok') return refuseRetestedOk(f);
	if (to === CLOSED) return refuseClose(f);
	return null;
}

/** Whether a move to `to` needs the job's facts (tests, sign-offs, clashes). */
export const needsJobFacts = (to: unknown) => to === 'retested_ok' || to === CLOSED;
