/**
 * What the rulebook reads of a job's tests before a status move or a sign-off, from the
 * stored rows in feed order (seq), inside the caller's transaction: each test's part,
 * positions, state and re-test link, its readings' verdicts, the sign-off decisions on it,
 * and the open clashes on the job and its tests. The rules themselves are the pure ones of
 * `src/lib/rules.ts` and `src/lib/tests/` that the phone runs too.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import type { JobFacts } from '../../rules';
import { jobFactsOf, type FactDecision, type FactReading, type FactTest } from '../../tests/facts';
import { signOffStateOf, type SignOffKind } from '../../tests/signoff';
import {
	circuitSignOffStates,
	closingCircuits,
	type FactCircuit
} from '../../tests/circuit-signoff';
import type { Actor } from '../auth/types';
import { db } from '../db';

type Row = Record<string, unknown>;
const select = (t: Transaction | undefined, sql: string, replacements: unknown[]) =>
	db().query<Row>(sql, { replacements, type: QueryTypes.SELECT, transaction: t });
const iso = (v: unknown) => (v == null ? null : new Date(v as string).toISOString());

/** A stored sign-off row as a decision of the pure rules. */
export const decisionOf = (r: Row): FactDecision => ({
	testId: String(r.test_id),
	decision: r.decision as FactDecision['decision'],
	mode: r.mode as FactDecision['mode'],
	note: (r.note as string | null) ?? null,
	by: (r.created_by as string | null) ?? null,
	at: iso(r.created_at),
	order: Number(r.seq)
});

/**
 * The live tests of a job (oldest first), their readings, its circuit tests (feed order) and
 * the decisions on both, as facts.
 */
export async function jobRecords(actor: Actor, jobId: string, t?: Transaction) {
	const w = actor.workshopId;
	const tests = await select(
		t,
		`SELECT id, part_number, position, state, needs_signoff, retest_of FROM tests
		 WHERE job_id = ? AND workshop_id = ? AND deleted_at IS NULL ORDER BY created_at, id`,
		[jobId, w]
	);
	const readings = await select(
		t,
		'SELECT test_id, check_key, position, server_verdict, seq FROM readings WHERE job_id = ? AND workshop_id = ?',
		[jobId, w]
	);
	const decisions = await select(
		t,
		'SELECT test_id, decision, mode, note, created_by, created_at, seq FROM signoffs WHERE job_id = ? AND workshop_id = ?',
		[jobId, w]
	);
	const circuits = await select(
		t,
		'SELECT id, kind, needs_signoff, seq FROM circuit_tests WHERE job_id = ? AND workshop_id = ? ORDER BY seq',
		[jobId, w]
	);
	return {
		circuits: circuits.map((r): FactCircuit => ({
			id: String(r.id),
			kind: String(r.kind),
			needsSignOff: Boolean(r.needs_signoff),
			order: Number(r.seq)
		})),
		tests: tests.map((r): FactTest => ({
			id: String(r.id),
			partNumber: (r.part_number as string | null) ?? null,
			position: (r.position as string | null) ?? null,
			state: String(r.state),
			needsSignOff: Boolean(r.needs_signoff),
			retestOf: (r.retest_of as string | null) ?? null
		})),
		readings: readings.map((r): FactReading => ({
			testId: String(r.test_id),
			checkKey: String(r.check_key),
			position: (r.position as string | null) ?? null,
			verdict: (r.server_verdict as string | null) ?? null,
			order: Number(r.seq)
		})),
		decisions: decisions.map(decisionOf)
	};
}

/** Open clashes on the job itself and on its tests. */
export async function openClashesOn(actor: Actor, jobId: string, t?: Transaction): Promise<number> {
	const [row] = await select(
		t,
		`SELECT COUNT(*) AS n FROM conflicts c WHERE c.workshop_id = ? AND c.status = 'open'
		 AND ((c.entity = 'job' AND c.entity_id = ?)
		   OR (c.entity = 'test' AND c.entity_id IN (SELECT id FROM tests WHERE job_id = ? AND workshop_id = ?)))`,
		[actor.workshopId, jobId, jobId, actor.workshopId]
	);
	return Number(row?.n ?? 0);
}

/** The facts `refuseRetestedOk` and `refuseClose` read for one job. */
export async function loadJobFacts(
	actor: Actor,
	jobId: string,
	t?: Transaction
): Promise<JobFacts> {
	const { tests, readings, decisions, circuits } = await jobRecords(actor, jobId, t);
	return {
		...jobFactsOf(tests, readings, decisions, await openClashesOn(actor, jobId, t)),
		circuits: closingCircuits(circuits, decisions)
	};
}

/** Whether a test needs a sign-off and where it stands, as `refuseSignOff` reads it. */
export type SignOffFacts = { jobId: string; needsSignOff: boolean; signOff: SignOffKind };

/**
 * The sign-off facts of the live tests `ids` of the actor's workshop (absent: no such test).
 * An id may name a circuit test, which is read with the job's other circuit tests of its kind
 * (a later one replaces one sent back).
 */
export async function signOffFacts(
	actor: Actor,
	ids: string[],
	t?: Transaction
): Promise<Map<string, SignOffFacts>> {
	if (!ids.length) return new Map();
	const w = actor.workshopId;
	const tests = await select(
		t,
		`SELECT t.id, t.job_id, t.needs_signoff, t.state,
		   (SELECT MAX(r.seq) FROM readings r WHERE r.test_id = t.id) AS reading_seq
		 FROM tests t WHERE t.id IN (?) AND t.workshop_id = ? AND t.deleted_at IS NULL`,
		[ids, w]
	);
	const decisions = (
		await select(
			t,
			'SELECT test_id, decision, mode, note, created_by, created_at, seq FROM signoffs WHERE test_id IN (?) AND workshop_id = ?',
			[ids, w]
		)
	).map(decisionOf);
	const found = new Set(tests.map((r) => String(r.id)));
	const rest = ids.filter((id) => !found.has(id));
	const circuits = rest.length
		? await select(
				t,
				`SELECT c.id, c.job_id, c.kind, c.needs_signoff, c.seq FROM circuit_tests c
				 JOIN circuit_tests me ON me.job_id = c.job_id AND me.kind = c.kind AND me.workshop_id = c.workshop_id
				 WHERE me.id IN (?) AND me.workshop_id = ?`,
				[rest, w]
			)
		: [];
	const circuitFacts = new Map<string, SignOffFacts>();
	if (circuits.length) {
		const byId = new Map(circuits.map((r) => [String(r.id), r]));
		const states = circuitSignOffStates(
			[...byId.values()].map((r) => ({
				id: String(r.id),
				kind: String(r.kind),
				needsSignOff: Boolean(r.needs_signoff),
				order: Number(r.seq)
			})),
			decisions
		);
		for (const id of rest) {
			const r = byId.get(id);
			if (r)
				circuitFacts.set(id, {
					jobId: String(r.job_id),
					needsSignOff: Boolean(r.needs_signoff),
					signOff: states.get(id)!.state.kind
				});
		}
	}
	return new Map([
		...tests.map((r) => {
			const test = { needsSignOff: Boolean(r.needs_signoff), state: String(r.state) };
			const mine = decisions.filter((d) => d.testId === r.id);
			const last = r.reading_seq == null ? null : Number(r.reading_seq);
			return [
				String(r.id),
				{
					jobId: String(r.job_id),
					needsSignOff: test.needsSignOff,
					signOff: signOffStateOf(test, mine, last).kind
				}
			] as const;
		}),
		...circuitFacts
	]);
}
