/**
 * Where an apprentice's circuit test (battery, parasitic draw, voltage drop, charging, relay,
 * crank or cam sensor) stands with its sign-off. The same rule as a coil test's
 * (`signoff.ts`), read for a record that is finished the moment it is saved and never
 * changes: it waits for a lead until a lead signs it off or sends it back. Doing it again
 * after a send-back is a new circuit test of the same kind on the job, which waits for its
 * own sign-off; the one sent back is then *replaced*: it no longer holds the job open, and
 * (like every test not signed off) it stays out of the customer's report.
 * Pure and isomorphic.
 */
import { signOffStateOf, type Decision, type SignOffKind, type SignOffState } from './signoff';

/** A circuit test as the sign-off rules read it; `order` is its place in the feed. */
export type FactCircuit = { id: string; kind: string; needsSignOff: boolean; order: number };

export type CircuitStanding = { state: SignOffState; replaced: boolean };

/** Each circuit test's sign-off state by id; `decisions` carry the circuit test's id as `testId`. */
export function circuitSignOffStates(
	circuits: readonly FactCircuit[],
	decisions: readonly (Decision & { testId: string })[]
): Map<string, CircuitStanding> {
	return new Map(
		circuits.map((c) => {
			const state = signOffStateOf(
				{ needsSignOff: c.needsSignOff, state: 'done' },
				decisions.filter((d) => d.testId === c.id),
				null
			);
			const replaced =
				state.kind === 'sent_back' && circuits.some((o) => o.kind === c.kind && o.order > c.order);
			return [c.id, { state, replaced }];
		})
	);
}

/** A circuit test as the closing rule counts it. */
export type ClosingCircuit = { id: string; signOff: SignOffKind; replaced: boolean };

export function closingCircuits(
	circuits: readonly FactCircuit[],
	decisions: readonly (Decision & { testId: string })[]
): ClosingCircuit[] {
	const states = circuitSignOffStates(circuits, decisions);
	return circuits.map((c) => {
		const s = states.get(c.id)!;
		return { id: c.id, signOff: s.state.kind, replaced: s.replaced };
	});
}
