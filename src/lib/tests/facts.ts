/**
 * A job's facts for its status rules (`refuseRetestedOk`, `refuseClose` in `src/lib/rules.ts`)
 * and the sign-off state of each of its tests, from the records either side holds: the server
 * reads them from its tables (feed order: seq), the phone from IndexedDB (the order they
 * reached the workshop, what it has not sent yet last). Pure and isomorphic.
 */
import type { ClosingTest, JobFacts } from '../rules';
import { signOffStateOf, type Decision, type SignOffState } from './signoff';

export type FactTest = {
	id: string;
	partNumber: string | null;
	/** Comma-separated cylinders or coil positions, as stored. */
	position: string | null;
	state: string;
	needsSignOff: boolean;
	retestOf: string | null;
};
/** A reading as far as the rules care: the workshop's verdict (the phone's until it is sent). */
export type FactReading = {
	testId: string;
	checkKey: string;
	position: string | null;
	verdict: string | null;
	order: number;
};
export type FactDecision = Decision & { testId: string };

/** The positions of a test, from the stored text ("1,2,3,4"). */
export const positionsOf = (position: unknown) =>
	String(position ?? '')
		.split(',')
		.map((p) => p.trim())
		.filter(Boolean);

/** "cylinder 3", "cylinders 1, 2" ('' for none), as the lists name a test's positions. */
export function positionsText(position: unknown): string {
	const list = positionsOf(position);
	return list.length ? `${list.length > 1 ? 'cylinders' : 'cylinder'} ${list.join(', ')}` : '';
}

const OUT_OF_SPEC = new Set(['low', 'high']);

/** Each test's sign-off state, by test id. */
export function signOffStates(
	tests: readonly FactTest[],
	readings: readonly FactReading[],
	decisions: readonly FactDecision[]
): Map<string, SignOffState> {
	const lastReading = new Map<string, number>();
	for (const r of readings)
		lastReading.set(r.testId, Math.max(r.order, lastReading.get(r.testId) ?? -Infinity));
	return new Map(
		tests.map((t) => [
			t.id,
			signOffStateOf(
				t,
				decisions.filter((d) => d.testId === t.id),
				lastReading.get(t.id) ?? null
			)
		])
	);
}

/**
 * The facts the status rules read. A test's `outOfSpec` counts the latest reading of each
 * check and position that the workshop judged under or over spec (a reading taken again
 * replaces the one before); `tests` keep the order given (oldest first).
 */
export function jobFactsOf(
	tests: readonly FactTest[],
	readings: readonly FactReading[],
	decisions: readonly FactDecision[],
	openClashes: number
): JobFacts {
	const states = signOffStates(tests, readings, decisions);
	const latest = new Map<string, FactReading>();
	for (const r of [...readings].sort((a, b) => a.order - b.order))
		latest.set(`${r.testId}|${r.checkKey}|${r.position ?? ''}`, r);
	const list: ClosingTest[] = tests.map((t) => {
		const mine = [...latest.values()].filter((r) => r.testId === t.id);
		return {
			id: t.id,
			partNumber: t.partNumber,
			positions: positionsOf(t.position),
			state: t.state,
			retestOf: t.retestOf,
			signOff: states.get(t.id)!.kind,
			readings: mine.length,
			outOfSpec: mine.filter((r) => r.verdict !== null && OUT_OF_SPEC.has(r.verdict)).length
		};
	});
	return { tests: list, openClashes };
}
