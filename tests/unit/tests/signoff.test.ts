/**
 * Sign-offs of apprentice work and the closing rules of a job (DESIGN §2.3, §2.7, §6): where
 * a test stands with its sign-off, and what "Re-tested OK" and "Closed" need. The rules are
 * the workshop's own (DESIGN §6, §7: "re-tested OK", "sign off"); re-testing the repaired
 * part against the same figures before handing the vehicle back is common practice. Part
 * numbers and people are invented.
 */
import { describe, expect, it } from 'vitest';
import {
	refuseClose,
	refuseRetestedOk,
	refuseSignOff,
	refuseStatusFacts,
	type ClosingTest
} from '../../../src/lib/rules';
import { ROLES } from '../../../src/lib/roles';
import { jobFactsOf, signOffStates, type FactTest } from '../../../src/lib/tests/facts';
import { isSignedOff, signOffStateOf, type Decision } from '../../../src/lib/tests/signoff';

const decision = (over: Partial<Decision>): Decision => ({
	decision: 'signed',
	mode: 'remote',
	note: null,
	by: 'lead-id',
	at: '2026-12-02T10:00:00.000Z',
	order: 10,
	...over
});
const apprenticeTest = { needsSignOff: true, state: 'done' };

describe('where an apprentice’s test stands with its sign-off', () => {
	it('needs none for a test a technician or lead did, nor for an abandoned test', () => {
		expect(signOffStateOf({ needsSignOff: false, state: 'done' }, [], 3).kind).toBe('not_needed');
		expect(signOffStateOf({ needsSignOff: true, state: 'abandoned' }, [], 3).kind).toBe(
			'not_needed'
		);
	});

	it('waits for a lead once finished, and not before', () => {
		expect(signOffStateOf({ needsSignOff: true, state: 'in_progress' }, [], 3).kind).toBe(
			'in_progress'
		);
		expect(signOffStateOf(apprenticeTest, [], 3).kind).toBe('waiting');
	});

	it('takes the latest decision in feed order, whatever order they are given in', () => {
		const back = decision({
			decision: 'sent_back',
			note: 'Read cylinder 3 on the 200 Ω range',
			order: 20
		});
		const signed = decision({ order: 30 });
		expect(signOffStateOf(apprenticeTest, [signed, back], 5)).toMatchObject({
			kind: 'signed',
			last: signed
		});
		expect(signOffStateOf(apprenticeTest, [back], 5)).toMatchObject({
			kind: 'sent_back',
			last: back
		});
	});

	it('waits again once the apprentice reads it again after a send-back, keeping the send-back', () => {
		const back = decision({ decision: 'sent_back', note: 'Zero the leads first', order: 20 });
		expect(signOffStateOf(apprenticeTest, [back], 19).kind).toBe('sent_back');
		expect(signOffStateOf(apprenticeTest, [back], 21)).toEqual({ kind: 'waiting', sentBack: back });
	});

	it('stays signed when readings reach the workshop after a sign-off made at the car', () => {
		const atTheCar = decision({ mode: 'witnessed', order: 20 });
		expect(signOffStateOf(apprenticeTest, [atTheCar], 40).kind).toBe('signed');
	});

	it('counts signed and not needed as signed off, nothing else', () => {
		expect(
			['not_needed', 'in_progress', 'waiting', 'signed', 'sent_back'].filter((k) =>
				isSignedOff(k as never)
			)
		).toEqual(['not_needed', 'signed']);
	});
});

describe('who may sign off or send back', () => {
	const who = (role: (typeof ROLES)[number]) => ({ role });
	it('leaves both to leads and owners', () => {
		expect(ROLES.filter((r) => refuseSignOff(who(r)) === null)).toEqual(['lead', 'owner']);
		expect(ROLES.filter((r) => refuseSignOff(who(r), undefined, 'sent_back') === null)).toEqual([
			'lead',
			'owner'
		]);
		expect(refuseSignOff(who('technician'), undefined, 'sent_back')).toBe(
			'Only a workshop lead or owner can send a test back'
		);
	});

	it('signs off only an apprentice’s test, never twice, and sends back only what is not waiting for the apprentice', () => {
		const lead = who('lead');
		expect(refuseSignOff(lead, { needsSignOff: false, signOff: 'not_needed' })).toBe(
			'Only a test done by an apprentice needs a sign-off'
		);
		expect(refuseSignOff(lead, { needsSignOff: true, signOff: 'not_needed' })).toMatch(/abandoned/);
		expect(refuseSignOff(lead, { needsSignOff: true, signOff: 'waiting' })).toBeNull();
		expect(refuseSignOff(lead, { needsSignOff: true, signOff: 'in_progress' })).toBeNull(); // watched at the car
		expect(refuseSignOff(lead, { needsSignOff: true, signOff: 'signed' })).toBe(
			'This test is already signed off'
		);
		expect(refuseSignOff(lead, { needsSignOff: true, signOff: 'sent_back' })).toBeNull();
		expect(refuseSignOff(lead, { needsSignOff: true, signOff: 'sent_back' }, 'sent_back')).toMatch(
			/already sent back/
		);
		expect(refuseSignOff(lead, { needsSignOff: true, signOff: 'signed' }, 'sent_back')).toBeNull();
	});
});

const test = (over: Partial<ClosingTest>): ClosingTest => ({
	id: 'first',
	partNumber: 'ZX-IC-77',
	positions: ['1', '2', '3', '4'],
	state: 'done',
	retestOf: null,
	signOff: 'not_needed',
	readings: 8,
	outOfSpec: 1,
	...over
});

describe('“Re-tested OK”', () => {
	it('needs a re-test after the repair, said in one sentence', () => {
		const why = refuseRetestedOk({ tests: [test({})], openClashes: 0 });
		expect(why).toBe(
			'Re-tested OK needs a re-test after the repair: open the first test of the repaired part and press Re-test.'
		);
	});

	it('needs the re-test finished with its readings taken', () => {
		const first = test({});
		for (const retest of [
			test({ id: 'r', retestOf: 'first', state: 'in_progress', readings: 4, outOfSpec: 0 }),
			test({ id: 'r', retestOf: 'first', state: 'done', readings: 0, outOfSpec: 0 })
		])
			expect(refuseRetestedOk({ tests: [first, retest], openClashes: 0 })).toBe(
				'Finish the re-test of ZX-IC-77 (cylinders 1, 2, 3, 4) first.'
			);
		expect(
			refuseRetestedOk({
				tests: [first, test({ id: 'r', retestOf: 'first', state: 'abandoned', outOfSpec: 0 })],
				openClashes: 0
			})
		).toMatch(/^Re-tested OK needs a re-test/);
	});

	it('refuses while the latest re-test of a part still reads out of spec, and allows it once one reads OK', () => {
		const first = test({});
		const bad = test({ id: 'r1', retestOf: 'first', outOfSpec: 1 });
		const good = test({ id: 'r2', retestOf: 'first', outOfSpec: 0 });
		expect(refuseRetestedOk({ tests: [first, bad], openClashes: 0 })).toBe(
			'The re-test of ZX-IC-77 (cylinders 1, 2, 3, 4) still reads out of spec, so the job is not re-tested OK.'
		);
		expect(refuseRetestedOk({ tests: [first, bad, good], openClashes: 0 })).toBeNull();
		expect(refuseStatusFacts('retested_ok', { tests: [first, good], openClashes: 0 })).toBeNull();
	});
});

describe('“Closed”', () => {
	it('needs no open clash and every apprentice test signed off, naming all that is missing in one sentence', () => {
		const tests = [
			test({ signOff: 'not_needed' }),
			test({ id: 'a1', signOff: 'waiting' }),
			test({ id: 'a2', signOff: 'sent_back' }),
			test({ id: 'a3', signOff: 'signed' })
		];
		expect(refuseClose({ tests, openClashes: 1 })).toBe(
			'The job cannot be closed yet: one clash on it is still open in the clash inbox and 2 tests by an apprentice are not signed off yet.'
		);
		expect(refuseClose({ tests: tests.slice(0, 2), openClashes: 0 })).toBe(
			'The job cannot be closed yet: one test by an apprentice is not signed off yet.'
		);
		expect(refuseClose({ tests: [], openClashes: 3 })).toBe(
			'The job cannot be closed yet: 3 clashes on it are still open in the clash inbox.'
		);
		expect(refuseClose({ tests: [tests[0], tests[3]], openClashes: 0 })).toBeNull();
		expect(refuseStatusFacts('closed', { tests: [tests[1]], openClashes: 0 })).toMatch(
			/cannot be closed/
		);
		expect(refuseStatusFacts('repaired', { tests: [tests[1]], openClashes: 5 })).toBeNull();
	});
});

describe('a job’s facts from its records', () => {
	const tests: FactTest[] = [
		{
			id: 'first',
			partNumber: 'ZX-IC-77',
			position: '1,2',
			state: 'done',
			needsSignOff: true,
			retestOf: null
		},
		{
			id: 'again',
			partNumber: 'ZX-IC-77',
			position: '2',
			state: 'done',
			needsSignOff: false,
			retestOf: 'first'
		}
	];
	const reading = (testId: string, position: string, verdict: string, order: number) => ({
		testId,
		checkKey: 'primary',
		position,
		verdict,
		order
	});

	it('judges a re-test by the latest reading of each check and position', () => {
		const readings = [
			reading('again', '2', 'high', 5), // read again after seating the connector
			reading('again', '2', 'within', 6),
			reading('first', '2', 'high', 1)
		];
		const facts = jobFactsOf(tests, readings, [], 0);
		expect(facts.tests.find((t) => t.id === 'again')).toMatchObject({
			readings: 1,
			outOfSpec: 0,
			positions: ['2']
		});
		expect(facts.tests.find((t) => t.id === 'first')).toMatchObject({
			readings: 1,
			outOfSpec: 1,
			signOff: 'waiting'
		});
		expect(refuseRetestedOk(facts)).toBeNull();
		expect(
			refuseRetestedOk(jobFactsOf(tests, [...readings, reading('again', '2', 'low', 7)], [], 0))
		).toMatch(/still reads out of spec/);
	});

	it('gives each test its sign-off state from the decisions on it', () => {
		const states = signOffStates(
			tests,
			[reading('first', '1', 'within', 1)],
			[
				{
					...decision({ decision: 'sent_back', note: 'Photo of the plug', order: 4 }),
					testId: 'first'
				}
			]
		);
		expect(states.get('first')?.kind).toBe('sent_back');
		expect(states.get('again')?.kind).toBe('not_needed');
	});
});
