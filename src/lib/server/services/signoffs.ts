/**
 * Sign-offs from the desk (`POST /api/tests/:id/signoff` and the office job page's form): a
 * workshop lead or owner signs off a test an apprentice did after reading it ("remote"), or
 * sends it back with a note the apprentice sees on the job. The same record, rules and
 * change feed as a sign-off from the lead's phone (sync's append-only path): in one
 * transaction,
 *  1. parse the decision (400 naming the field: a send-back needs its note);
 *  2. the rulebook's `refuseAppend` on the test's job and where the test stands (404 when the
 *     actor may not see it, 403 with the reason otherwise);
 *  3. the test's summary (the overview's waiting count), the next feed seq, the row — its
 *     signer is the signed-in user, never a field — and the audit row.
 * Also the desk's list of tests waiting for a sign-off or sent back, and its count. A circuit
 * test (battery, charging, …) saved by an apprentice is signed off the same way: the decision's
 * `test_id` is the circuit test's id, and no test summary is kept for it.
 */
import { Op, QueryTypes, type Transaction } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { signoffDecision } from '../../schemas/records';
import type { SignOffDecision } from '../../tests/signoff';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { appendRecord } from '../db/append-tables';
import { nextSeq, writeAudit } from '../db/feed';
import { Test } from '../db/models';
import { rawQuery, sqlDateTime } from '../db/raw';
import { addDecision, addToSummaries, emptyDelta } from '../db/summaries';
import { ForbiddenError, NotFoundError, ValidationError } from '../errors';
import { signOffFacts } from './job-facts';
import { jobWithVehicle, refuseAppend } from './rules';
import { inTransaction } from './write-path';

/**
 * Sign off the test `testId`, or send it back (`{ decision, note, mode }`, mode `remote` by
 * default); returns the stored sign-off as the feed sends it.
 */
export async function decideTest(
	actor: Actor,
	testId: string,
	input: unknown,
	o: { transaction?: Transaction } = {}
): Promise<Record<string, unknown>> {
	const parsed = signoffDecision.safeParse(input ?? {});
	if (!parsed.success) throw ValidationError.fromZod(parsed.error);
	const { decision, mode, note } = parsed.data as {
		decision: SignOffDecision;
		mode: string;
		note?: string | null;
	};
	return inTransaction(o.transaction, async (t) => {
		const w = actor.workshopId;
		const test = await Test.findOne({
			where: { id: testId, workshopId: w, deletedAt: { [Op.is]: null } },
			transaction: t
		});
		// Not a coil test: an apprentice's circuit test (battery, charging, …) is signed off alike.
		const facts = (await signOffFacts(actor, [testId], t)).get(testId);
		if (!test && !facts) throw new NotFoundError('Test');
		const jobId = test ? test.jobId : facts!.jobId;
		const found = await jobWithVehicle(actor, jobId, t);
		const refusal = refuseAppend(
			actor,
			'signoff',
			found ? { assigneeId: found.job.assigneeId, hybrid: found.hybrid } : undefined,
			facts && { ...facts, decision }
		);
		if (refusal?.reason === 'not_found') throw new NotFoundError('Test');
		if (refusal) throw new ForbiddenError(refusal.message);
		const delta = emptyDelta();
		addDecision(delta, decision);
		if (test) await addToSummaries(t, w, new Map([[testId, delta]]));
		const [id, opId, now] = [uuidv7(), uuidv7(), new Date()];
		const seq = await nextSeq(t, w);
		await rawQuery(
			t,
			`INSERT INTO signoffs (seq, workshop_id, id, op_id, created_by, device_id, device_time, job_id, test_id, mode, decision, note, created_at)
			 VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, UTC_TIMESTAMP(3))`,
			[
				seq,
				w,
				id,
				opId,
				actor.userId,
				actor.deviceId ?? 'web',
				sqlDateTime(now),
				jobId,
				testId,
				mode,
				decision,
				note ?? null
			]
		);
		const audit = Object.entries({ testId, decision, mode, note: note ?? null }).map(
			([field, v]) => ({ field, old: null, new: v })
		);
		await writeAudit(t, actor, 'signoff', id, 'create', audit, opId);
		const [row] = await db().query<Record<string, unknown>>('SELECT * FROM signoffs WHERE id = ?', {
			replacements: [id],
			type: QueryTypes.SELECT,
			transaction: t
		});
		return appendRecord('signoff', row);
	});
}

/** One test on the desk's list, with its job and vehicle. */
export type DueTest = {
	id: string;
	jobId: string;
	jobNumber: number;
	vehicle: string | null;
	partNumber: string | null;
	positions: string | null;
	technicianId: string | null;
	/** When the test last changed (finished, or read again). */
	changedAt: string;
	/** Waiting for a lead, or sent back and waiting for the apprentice. */
	due: 'lead' | 'apprentice';
	/** A send-back before it (waiting again since readings were added). */
	sentBackBefore: boolean;
	/** A circuit test's kind (battery, charging, …); null for a coil or part test. */
	circuitKind: string | null;
};

/**
 * Apprentices' circuit tests waiting for a lead or sent back, their latest decision beside
 * them; one sent back and done again since (a later circuit test of its kind on the job) is
 * replaced and left out (`tests/circuit-signoff.ts`).
 */
const CIRCUIT_DUE_SQL = `SELECT * FROM (
	SELECT c.id, c.job_id, c.kind, c.created_by, c.created_at, c.seq, j.number, v.make, v.model, v.plate,
		(SELECT s.decision FROM signoffs s WHERE s.test_id = c.id AND s.workshop_id = c.workshop_id ORDER BY s.seq DESC LIMIT 1) AS signoff,
		EXISTS (SELECT 1 FROM circuit_tests n WHERE n.job_id = c.job_id AND n.kind = c.kind AND n.seq > c.seq) AS redone
	FROM circuit_tests c JOIN jobs j ON j.id = c.job_id AND j.deleted_at IS NULL
	LEFT JOIN vehicles v ON v.id = j.vehicle_id
	WHERE c.workshop_id = ? AND c.needs_signoff = 1) d
	WHERE d.signoff IS NULL OR (d.signoff = 'sent_back' AND d.redone = 0)`;

const DUE_SQL = `SELECT t.id, t.job_id, t.part_number, t.position, t.technician_id, t.state, t.updated_at,
		j.number, v.make, v.model, v.plate, s.signoff, s.revised
	FROM tests t JOIN jobs j ON j.id = t.job_id AND j.deleted_at IS NULL
	LEFT JOIN vehicles v ON v.id = j.vehicle_id
	LEFT JOIN test_summaries s ON s.test_id = t.id
	WHERE t.workshop_id = ? AND t.needs_signoff = 1 AND t.state = 'done' AND t.deleted_at IS NULL
		AND (s.signoff IS NULL OR s.signoff = 'sent_back')`;

/**
 * The workshop's finished apprentice tests that wait for a lead (oldest first) and those sent
 * back to the apprentice (leads and owners; the caller checks the role).
 */
export async function listDue(actor: Actor): Promise<DueTest[]> {
	const rows = await db().query<Record<string, unknown>>(`${DUE_SQL} ORDER BY t.updated_at, t.id`, {
		replacements: [actor.workshopId],
		type: QueryTypes.SELECT
	});
	const tests: DueTest[] = rows.map((r) => ({
		id: String(r.id),
		jobId: String(r.job_id),
		jobNumber: Number(r.number),
		vehicle: r.make ? [`${r.make} ${r.model}`, r.plate].filter(Boolean).join(' · ') : null,
		partNumber: (r.part_number as string | null) ?? null,
		positions: (r.position as string | null) ?? null,
		technicianId: (r.technician_id as string | null) ?? null,
		changedAt: new Date(r.updated_at as string).toISOString(),
		due: r.signoff === 'sent_back' && !Number(r.revised) ? 'apprentice' : 'lead',
		sentBackBefore: r.signoff === 'sent_back',
		circuitKind: null
	}));
	const circuits = await db().query<Record<string, unknown>>(
		`${CIRCUIT_DUE_SQL} ORDER BY d.created_at, d.id`,
		{
			replacements: [actor.workshopId],
			type: QueryTypes.SELECT
		}
	);
	const both: DueTest[] = [
		...tests,
		...circuits.map((r) => ({
			id: String(r.id),
			jobId: String(r.job_id),
			jobNumber: Number(r.number),
			vehicle: r.make ? [`${r.make} ${r.model}`, r.plate].filter(Boolean).join(' · ') : null,
			partNumber: null,
			positions: null,
			technicianId: (r.created_by as string | null) ?? null,
			changedAt: new Date(r.created_at as string).toISOString(),
			due: r.signoff === 'sent_back' ? ('apprentice' as const) : ('lead' as const),
			sentBackBefore: r.signoff === 'sent_back',
			circuitKind: String(r.kind)
		}))
	];
	return both.sort((a, b) => a.changedAt.localeCompare(b.changedAt) || a.id.localeCompare(b.id));
}

/** How many finished apprentice tests wait for a lead's sign-off (the navigation's count). */
export async function countWaiting(actor: Pick<Actor, 'workshopId'>): Promise<number> {
	const [row] = await db().query<{ n: number | bigint }>(
		`SELECT (SELECT COUNT(*) FROM (${DUE_SQL}) d WHERE d.signoff IS NULL OR d.revised = 1)
			+ (SELECT COUNT(*) FROM (${CIRCUIT_DUE_SQL}) e WHERE e.signoff IS NULL) AS n`,
		{ replacements: [actor.workshopId, actor.workshopId], type: QueryTypes.SELECT }
	);
	return Number(row?.n ?? 0);
}
