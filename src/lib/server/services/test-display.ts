/**
 * A job's tests for the office page and the JSON API: the same records the phones pull
 * (tests through their aggregate, append-only rows as the feed sends them), drawn by the
 * shared `buildJobTests`, with each test's sign-off. Whoever may open the job may read its
 * tests (leads: every job).
 */
import { QueryTypes } from 'sequelize';
import { Op } from 'sequelize';
import { buildJobTests, signOffViewOf, type SheetChecks, type SignOffView } from '../../tests/view';
import { circuitSignOffStates } from '../../tests/circuit-signoff';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { SpecSheet, Test, User } from '../db/models';
import { NotFoundError } from '../errors';
import { appendRecord } from '../db/append-tables';
import { seenJob } from './rules';
import { tests as testAggregate } from './tests';

/**
 * Every row of an append-only table under one job, oldest first, as the feed sends it, with
 * its place in the feed (`order`: what the sign-off state reads).
 */
async function appendRows(actor: Actor, table: string, entity: string, jobId: string) {
	const rows = await db().query<Record<string, unknown>>(
		`SELECT * FROM ${table} WHERE job_id = ? AND workshop_id = ? ORDER BY seq`,
		{ replacements: [jobId, actor.workshopId], type: QueryTypes.SELECT }
	);
	return rows.map((r) => ({ ...appendRecord(entity, r), order: Number(r.seq) }));
}

/** The tests, spark tests and swap tests of a job the actor may open (404 otherwise). */
export async function jobTests(actor: Actor, jobId: string, locale = 'en-GB') {
	await seenJob(actor, jobId);
	const rows = await Test.findAll({
		where: { workshopId: actor.workshopId, jobId, deletedAt: { [Op.is]: null } },
		order: [['createdAt', 'ASC']]
	});
	const tests = rows.map((r) => ({
		...testAggregate.toRecord(r as never),
		createdAt: r.get('createdAt')
	}));
	const sheetIds = [...new Set(rows.flatMap((r) => (r.sheetId ? [r.sheetId] : [])))];
	const [readings, signoffs, sparks, swaps, sheets, users] = await Promise.all([
		appendRows(actor, 'readings', 'reading', jobId),
		appendRows(actor, 'signoffs', 'signoff', jobId),
		appendRows(actor, 'spark_tests', 'spark_test', jobId),
		appendRows(actor, 'swap_tests', 'swap_test', jobId),
		SpecSheet.findAll({ where: { workshopId: actor.workshopId, id: sheetIds } }),
		User.findAll({ where: { workshopId: actor.workshopId }, attributes: ['id', 'name', 'role'] })
	]);
	return buildJobTests({
		tests,
		readings,
		signoffs,
		sparks,
		swaps,
		sheets: sheets.map((s) => ({
			id: s.id,
			sheetVersion: s.sheetVersion,
			checks: s.checks as SheetChecks['checks']
		})),
		people: new Map(users.map((u) => [u.id, { name: u.name, role: u.role }])),
		locale
	});
}

/** One test of the workshop with its job's spark and swap tests (404 when not the actor's to open). */
export async function oneTest(actor: Actor, testId: string, locale = 'en-GB') {
	const row = await Test.findOne({
		where: { id: testId, workshopId: actor.workshopId, deletedAt: { [Op.is]: null } }
	});
	if (!row) throw new NotFoundError('Test');
	const all = await jobTests(actor, row.jobId, locale).catch((e) => {
		throw e instanceof NotFoundError ? new NotFoundError('Test') : e;
	});
	return {
		jobId: row.jobId,
		test: all.tests.find((t) => t.id === testId)!,
		sparks: all.sparks,
		swaps: all.swaps
	};
}

/** A circuit test as the office page shows it: the server's result, and the phone's when it differs. */
export type CircuitTestView = {
	id: string;
	kind: string;
	verdict: string;
	summary: string;
	lines: { label: string; verdict: string; text: string }[];
	working: string[];
	deviceVerdict: string | null;
	mismatch: boolean;
	by: string | null;
	at: string;
	/** An apprentice's circuit test waits for a lead's sign-off, as a coil test does. */
	signOff: SignOffView;
	/** Sent back and done again since (a later test of its kind on the job). */
	replaced: boolean;
};

/** The circuit tests (battery, draw, drop, charging, relay, sensor) of a job the actor may open, newest first. */
export async function jobCircuitTests(actor: Actor, jobId: string): Promise<CircuitTestView[]> {
	await seenJob(actor, jobId);
	const [rows, signoffs, people] = await Promise.all([
		appendRows(actor, 'circuit_tests', 'circuit_test', jobId) as Promise<Record<string, unknown>[]>,
		appendRows(actor, 'signoffs', 'signoff', jobId) as Promise<(Record<string, unknown> & { order: number })[]>,
		User.findAll({ where: { workshopId: actor.workshopId }, attributes: ['id', 'name', 'role'] })
	]);
	const users = new Map(people.map((u) => [u.id, u.name]));
	const standing = circuitSignOffStates(
		rows.map((r) => ({
			id: String(r.id),
			kind: String(r.kind),
			needsSignOff: Boolean(r.needsSignOff),
			order: Number(r.order)
		})),
		signoffs.map((d) => ({
			testId: String(d.testId),
			decision: d.decision === 'sent_back' ? 'sent_back' : 'signed',
			mode: d.mode === 'witnessed' ? 'witnessed' : 'remote',
			note: (d.note as string | null) ?? null,
			by: (d.createdBy as string | null) ?? null,
			at: d.createdAt ? new Date(d.createdAt as string).toISOString() : null,
			order: d.order
		}))
	);
	const who = new Map(people.map((u) => [u.id, { name: u.name, role: u.role }]));
	return rows
		.map((r) => {
			const server = r.serverResult as {
				verdict: string;
				summary: string;
				lines: CircuitTestView['lines'];
				working: string[];
			};
			const device = r.deviceResult as { verdict?: string } | null;
			return {
				id: r.id as string,
				kind: r.kind as string,
				verdict: server.verdict,
				summary: server.summary,
				lines: server.lines ?? [],
				working: server.working ?? [],
				deviceVerdict: device?.verdict ?? null,
				mismatch: Boolean(r.mismatch),
				by: users.get(r.createdBy as string) ?? null,
				at: new Date(r.createdAt as string).toISOString(),
				signOff: signOffViewOf(standing.get(String(r.id))!.state, who),
				replaced: standing.get(String(r.id))!.replaced
			};
		})
		.reverse();
}
