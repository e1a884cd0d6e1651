/**
 * Each test's row in `test_summaries` (what the lead's overview reads instead of every
 * reading): how many of its readings were out of spec, can't tell or OK, how many were read
 * on a range that could not resolve the spec, the latest sign-off decision, and whether
 * readings came in after it (`revised`). The sync path and the desk's sign-offs add to it in
 * one statement per write, rows in test id order so that two writers lock them in the same
 * order.
 */
import type { Transaction } from 'sequelize';
import type { SignOffDecision } from '../../tests/signoff';
import { rawQuery } from './raw';

/** What one write adds to a test's summary. */
export type SummaryDelta = {
	/** readings, out of spec, can't tell, OK, unresolved, range known. */
	counts: [number, number, number, number, number, number];
	/** The last decision this write made on the test (null: none). */
	decision: SignOffDecision | null;
	/** Readings of this write came after that decision (or, with none, at all). */
	readingAfter: boolean;
};

/** A delta with nothing in it yet. */
export const emptyDelta = (): SummaryDelta => ({
	counts: [0, 0, 0, 0, 0, 0],
	decision: null,
	readingAfter: false
});

/** Count one reading of the workshop's `verdict` (`unresolved`: null when not known). */
export function addReading(d: SummaryDelta, verdict: string, unresolved: 0 | 1 | null) {
	const s = d.counts;
	s[0]++;
	if (verdict === 'low' || verdict === 'high' || verdict === 'not_ok') s[1]++;
	else if (verdict === 'borderline' || verdict === 'depends' || verdict === 'bad_zero' || verdict === 'over_range') s[2]++;
	else if (verdict === 'within') s[3]++;
	if (unresolved !== null) {
		s[4] += unresolved;
		s[5]++;
	}
	d.readingAfter = true;
}

/** Record a decision: readings before it in the same write no longer count as after it. */
export function addDecision(d: SummaryDelta, decision: SignOffDecision) {
	d.decision = decision;
	d.readingAfter = false;
}

/**
 * Add the deltas to their tests' summaries: one statement. `revised` is set before `signoff`
 * in the update list, so it still reads the decision stored before this write.
 */
export async function addToSummaries(
	t: Transaction,
	workshopId: string,
	deltas: Map<string, SummaryDelta>
): Promise<void> {
	if (!deltas.size) return;
	const rows = [...deltas].sort(([a], [b]) => (a < b ? -1 : 1));
	await rawQuery(
		t,
		`INSERT INTO test_summaries (test_id, workshop_id, readings, out_of_spec, cant_tell, ok, unresolved, range_known, signoff, revised)
		 VALUES ${rows.map(() => '(?, ?, ?, ?, ?, ?, ?, ?, ?, ?)').join(', ')}
		 ON DUPLICATE KEY UPDATE readings = readings + VALUES(readings), out_of_spec = out_of_spec + VALUES(out_of_spec),
		   cant_tell = cant_tell + VALUES(cant_tell), ok = ok + VALUES(ok), unresolved = unresolved + VALUES(unresolved),
		   range_known = range_known + VALUES(range_known),
		   revised = IF(VALUES(signoff) IS NOT NULL, VALUES(revised), IF(signoff IS NOT NULL AND VALUES(readings) > 0, 1, revised)),
		   signoff = COALESCE(VALUES(signoff), signoff)`,
		rows.flatMap(([testId, d]) => [
			testId,
			workshopId,
			...d.counts,
			d.decision,
			d.decision && d.readingAfter ? 1 : 0
		])
	);
}
