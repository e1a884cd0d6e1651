/**
 * An apprentice's circuit test and its sign-off (DESIGN §6: an apprentice's work waits for a
 * lead), and what the closing rule counts. Pure rules of the product; no outside figures.
 */
import { describe, expect, it } from 'vitest';
import { refuseClose } from '../../../src/lib/rules';
import { circuitSignOffStates, closingCircuits, type FactCircuit } from '../../../src/lib/tests/circuit-signoff';
import type { FactDecision } from '../../../src/lib/tests/facts';

const circuit = (id: string, kind: string, order: number, needsSignOff = true): FactCircuit => ({ id, kind, needsSignOff, order });
const decide = (testId: string, decision: 'signed' | 'sent_back', order: number): FactDecision => ({
	testId,
	decision,
	mode: 'remote',
	note: decision === 'sent_back' ? 'Read it again once the modules sleep.' : null,
	by: 'lead',
	at: null,
	order
});

describe('an apprentice’s circuit test', () => {
	it('waits for a lead from the moment it is saved, and is signed or sent back by the latest decision', () => {
		const list = [circuit('a', 'battery', 1), circuit('b', 'relay', 2), circuit('c', 'charging', 3, false)];
		const s = circuitSignOffStates(list, [decide('a', 'sent_back', 4), decide('a', 'signed', 5), decide('b', 'sent_back', 6)]);
		expect([...s].map(([id, x]) => [id, x.state.kind, x.replaced])).toEqual([
			['a', 'signed', false],
			['b', 'sent_back', false],
			['c', 'not_needed', false]
		]);
	});

	it('sent back and done again: the later one of its kind replaces it and waits for its own sign-off', () => {
		const list = [circuit('a', 'parasitic', 1), circuit('b', 'parasitic', 3), circuit('c', 'battery', 4)];
		const s = circuitSignOffStates(list, [decide('a', 'sent_back', 2)]);
		expect(s.get('a')).toMatchObject({ state: { kind: 'sent_back' }, replaced: true });
		expect(s.get('b')).toMatchObject({ state: { kind: 'waiting' }, replaced: false });
		// Another kind does not replace it.
		const other = circuitSignOffStates([circuit('a', 'parasitic', 1), circuit('c', 'battery', 4)], [decide('a', 'sent_back', 2)]);
		expect(other.get('a')?.replaced).toBe(false);
	});
});

describe('closing a job with circuit tests', () => {
	const tests = { tests: [], openClashes: 0 };
	it('counts apprentice circuit tests not signed off, leaving out those done again since', () => {
		const list = [circuit('a', 'parasitic', 1), circuit('b', 'parasitic', 3), circuit('c', 'battery', 4)];
		const circuits = closingCircuits(list, [decide('a', 'sent_back', 2)]);
		expect(refuseClose({ ...tests, circuits })).toBe('The job cannot be closed yet: 2 tests by an apprentice are not signed off yet.');
		const signed = closingCircuits(list, [decide('a', 'sent_back', 2), decide('b', 'signed', 5), decide('c', 'signed', 6)]);
		expect(refuseClose({ ...tests, circuits: signed })).toBeNull();
	});
	it('needs nothing for a technician’s circuit tests', () => {
		expect(refuseClose({ ...tests, circuits: closingCircuits([circuit('a', 'relay', 1, false)], []) })).toBeNull();
	});
});
