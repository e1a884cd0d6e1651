/**
 * The lead's overview (leads and owners): two grouped queries over the tests that reached
 * the workshop in a date range, then the pure tables of `src/lib/overview/tables.ts`.
 *
 * 1. The tests in the range, read from the covering index `tests_overview`, each joined to
 *    its one row in `test_summaries` (its readings' verdicts and range flags, kept up to date
 *    by the sync path, with its latest sign-off decision) — the readings themselves are never
 *    read — grouped by part number, person, state and meter: a few hundred rows at most.
 *    Apprentices' finished tests with no sign-off (or sent back and read again since) are
 *    the person's tests waiting for a sign-off, as `signOffStateOf` decides.
 * 2. The lead zero of the tests that subtracted their leads, per meter and period, from the
 *    same index.
 * 3. The circuit tests (battery, charging, …) in the range by kind and person: their own
 *    table, and counted with each person's tests.
 * Abandoned and deleted tests are left out. Filters and sorts apply to the grouped rows, so
 * they cost nothing in the database. `npm run bench:overview` times this on 200,000 readings.
 */
import { QueryTypes } from 'sequelize';
import {
	bucketFor,
	overviewTables,
	type Bucket,
	type CircuitGroup,
	type LeadPoint,
	type TestGroup
} from '../../overview/tables';
import { daysOf, overviewQuery, type OverviewQuery } from '../../schemas/overview';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { User } from '../db/models';
import { ValidationError } from '../errors';

/** The SQL of both queries (kept here so the benchmark can EXPLAIN exactly these). */
export const OVERVIEW_SQL = {
	groups: `SELECT t.part_number, t.technician_id, t.state, t.meter_name, COUNT(*) AS tests,
		SUM(s.out_of_spec > 0) AS out_of_spec,
		SUM(COALESCE(s.out_of_spec, 0) = 0 AND s.cant_tell > 0) AS cant_tell,
		SUM(COALESCE(s.out_of_spec, 0) = 0 AND COALESCE(s.cant_tell, 0) = 0 AND s.ok > 0) AS ok,
		SUM(s.readings) AS readings, SUM(s.unresolved) AS unresolved, SUM(s.range_known) AS range_known,
		SUM(t.relative_mode) AS relative,
		SUM(t.needs_signoff = 1 AND t.state = 'done'
			AND (s.signoff IS NULL OR (s.signoff = 'sent_back' AND s.revised = 1))) AS waiting
	FROM tests t LEFT JOIN test_summaries s ON s.test_id = t.id
	WHERE t.workshop_id = ? AND t.created_at >= ? AND t.created_at < ?
		AND t.deleted_at IS NULL AND t.state <> 'abandoned'
	GROUP BY t.part_number, t.technician_id, t.state, t.meter_name`,
	leadZero: (
		bucket: Bucket
	) => `SELECT t.meter_name, ${PERIOD[bucket]} AS period, COUNT(*) AS tests,
		AVG(t.lead_ohms) AS avg_ohms, MIN(t.lead_ohms) AS min_ohms, MAX(t.lead_ohms) AS max_ohms
	FROM tests t
	WHERE t.workshop_id = ? AND t.created_at >= ? AND t.created_at < ?
		AND t.deleted_at IS NULL AND t.state <> 'abandoned' AND t.relative_mode = 0 AND t.lead_ohms IS NOT NULL
	GROUP BY t.meter_name, period`,
	/** Circuit tests in the range by kind and person (index `circuit_tests_overview`). */
	circuits: `SELECT c.kind, c.created_by, COUNT(*) AS tests,
		SUM(c.server_verdict IN ('low', 'high', 'not_ok')) AS out_of_spec,
		SUM(c.server_verdict IN ('cant_tell', 'charge_retest')) AS cant_tell,
		SUM(c.server_verdict = 'ok') AS ok,
		SUM(c.mismatch) AS differ,
		SUM(c.needs_signoff = 1 AND NOT EXISTS (SELECT 1 FROM signoffs s WHERE s.test_id = c.id)) AS waiting
	FROM circuit_tests c JOIN jobs j ON j.id = c.job_id AND j.deleted_at IS NULL
	WHERE c.workshop_id = ? AND c.created_at >= ? AND c.created_at < ?
	GROUP BY c.kind, c.created_by`
};

const PERIOD: Record<Bucket, string> = {
	day: "DATE_FORMAT(t.created_at, '%Y-%m-%d')",
	week: "DATE_FORMAT(DATE_SUB(DATE(t.created_at), INTERVAL WEEKDAY(t.created_at) DAY), '%Y-%m-%d')",
	month: "DATE_FORMAT(t.created_at, '%Y-%m-01')"
};

type GroupRow = {
	part_number: string | null;
	technician_id: string | null;
	state: TestGroup['state'];
	meter_name: string | null;
	[k: string]: unknown;
};

/** Parse a query string object (400 naming the field when it is wrong). */
export function parseOverviewQuery(input: unknown): OverviewQuery {
	const r = overviewQuery.safeParse(input);
	if (!r.success) throw ValidationError.fromZod(r.error);
	return r.data;
}

/** The range's bounds as DATETIME text: from the first day's start to the day after the last. */
export function boundsOf(q: Pick<OverviewQuery, 'from' | 'to'>, today = new Date()) {
	const { from, to } = daysOf(q, today);
	if (from > to) throw new ValidationError({ from: 'The start is after the end' });
	const after = new Date(Date.parse(`${to}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10);
	return { from, to, start: `${from} 00:00:00.000`, end: `${after} 00:00:00.000` };
}

/** The overview of the actor's workshop for a parsed query. */
export async function readOverview(actor: Actor, q: OverviewQuery, today = new Date()) {
	const { from, to, start, end } = boundsOf(q, today);
	const bucket = bucketFor(from, to);
	const args = [actor.workshopId, start, end];
	const [rows, leadRows, circuitRows, users] = await Promise.all([
		db().query<GroupRow>(OVERVIEW_SQL.groups, { replacements: args, type: QueryTypes.SELECT }),
		db().query<Record<string, unknown>>(OVERVIEW_SQL.leadZero(bucket), {
			replacements: args,
			type: QueryTypes.SELECT
		}),
		db().query<Record<string, unknown>>(OVERVIEW_SQL.circuits, {
			replacements: args,
			type: QueryTypes.SELECT
		}),
		User.findAll({ where: { workshopId: actor.workshopId }, attributes: ['id', 'name', 'role'] })
	]);
	const n = (v: unknown) => Number(v ?? 0);
	const groups: TestGroup[] = rows.map((r) => ({
		partNumber: r.part_number,
		technicianId: r.technician_id,
		state: r.state,
		meterName: r.meter_name,
		tests: n(r.tests),
		outOfSpec: n(r.out_of_spec),
		cantTell: n(r.cant_tell),
		ok: n(r.ok),
		readings: n(r.readings),
		unresolved: n(r.unresolved),
		rangeKnown: n(r.range_known),
		relative: n(r.relative),
		waiting: n(r.waiting)
	}));
	const points: LeadPoint[] = leadRows.map((r) => ({
		meterName: (r.meter_name as string | null) ?? null,
		period: String(r.period),
		tests: n(r.tests),
		avgOhms: n(r.avg_ohms),
		minOhms: n(r.min_ohms),
		maxOhms: n(r.max_ohms)
	}));
	const circuits: CircuitGroup[] = circuitRows.map((r) => ({
		kind: String(r.kind),
		technicianId: (r.created_by as string | null) ?? null,
		tests: n(r.tests),
		outOfSpec: n(r.out_of_spec),
		cantTell: n(r.cant_tell),
		ok: n(r.ok),
		differ: n(r.differ),
		waiting: n(r.waiting)
	}));
	const people = users.map((u) => ({ id: u.id, name: u.name, role: u.role }));
	return { from, to, bucket, ...overviewTables(q, groups, points, people, circuits) };
}
export type Overview = Awaited<ReturnType<typeof readOverview>>;
