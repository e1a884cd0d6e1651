/**
 * The lead's overview (leads and owners): two grouped queries over the tests that reached
 * the workshop in a date range, then the pure tables of `src/lib/overview/tables.ts`.
 *
 * 1. Per test (index `tests_workshop_created`), its readings' worst verdict and range flags
 *    from the covering index `readings_test_summary` — the reading rows themselves are never
 *    read — then grouped by part number, person, state and meter: a few hundred rows at most.
 * 2. The lead zero of the tests that subtracted their leads, per meter and period.
 * Abandoned and deleted tests are left out. Filters and sorts apply to the grouped rows, so
 * they cost nothing in the database. `npm run bench:overview` times this on 200,000 readings.
 */
import { QueryTypes } from 'sequelize';
import { bucketFor, overviewTables, type Bucket, type LeadPoint, type TestGroup } from '../../overview/tables';
import { daysOf, overviewQuery, type OverviewQuery } from '../../schemas/overview';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { User } from '../db/models';
import { ValidationError } from '../errors';

/** The SQL of both queries (kept here so the benchmark can EXPLAIN exactly these). */
export const OVERVIEW_SQL = {
	groups: `SELECT x.part_number, x.technician_id, x.state, x.meter_name,
		COUNT(*) AS tests, SUM(x.bad) AS out_of_spec, SUM(x.bad = 0 AND x.unsure = 1) AS cant_tell,
		SUM(x.bad = 0 AND x.unsure = 0 AND x.good = 1) AS ok, SUM(x.readings) AS readings,
		SUM(x.unresolved) AS unresolved, SUM(x.known) AS range_known, SUM(x.relative_mode) AS relative
	FROM (
		SELECT t.id, t.part_number, t.technician_id, t.state, t.meter_name, t.relative_mode,
			COUNT(r.test_id) AS readings,
			COALESCE(MAX(r.server_verdict IN ('low', 'high')), 0) AS bad,
			COALESCE(MAX(r.server_verdict IN ('borderline', 'depends')), 0) AS unsure,
			COALESCE(MAX(r.server_verdict = 'within'), 0) AS good,
			COALESCE(SUM(r.range_unresolved), 0) AS unresolved,
			COUNT(r.range_unresolved) AS known
		FROM tests t LEFT JOIN readings r ON r.test_id = t.id
		WHERE t.workshop_id = ? AND t.created_at >= ? AND t.created_at < ?
			AND t.deleted_at IS NULL AND t.state <> 'abandoned'
		GROUP BY t.id
	) x
	GROUP BY x.part_number, x.technician_id, x.state, x.meter_name`,
	leadZero: (bucket: Bucket) => `SELECT t.meter_name, ${PERIOD[bucket]} AS period, COUNT(*) AS tests,
		AVG(t.lead_ohms) AS avg_ohms, MIN(t.lead_ohms) AS min_ohms, MAX(t.lead_ohms) AS max_ohms
	FROM tests t
	WHERE t.workshop_id = ? AND t.created_at >= ? AND t.created_at < ?
		AND t.deleted_at IS NULL AND t.state <> 'abandoned' AND t.relative_mode = 0 AND t.lead_ohms IS NOT NULL
	GROUP BY t.meter_name, period`
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
	const [rows, leadRows, users] = await Promise.all([
		db().query<GroupRow>(OVERVIEW_SQL.groups, { replacements: args, type: QueryTypes.SELECT }),
		db().query<Record<string, unknown>>(OVERVIEW_SQL.leadZero(bucket), { replacements: args, type: QueryTypes.SELECT }),
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
		relative: n(r.relative)
	}));
	const points: LeadPoint[] = leadRows.map((r) => ({
		meterName: (r.meter_name as string | null) ?? null,
		period: String(r.period),
		tests: n(r.tests),
		avgOhms: n(r.avg_ohms),
		minOhms: n(r.min_ohms),
		maxOhms: n(r.max_ohms)
	}));
	const people = users.map((u) => ({ id: u.id, name: u.name, role: u.role }));
	return { from, to, bucket, ...overviewTables(q, groups, points, people) };
}
export type Overview = Awaited<ReturnType<typeof readOverview>>;
