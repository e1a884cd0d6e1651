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
import { sqlDateTime } from '../db/raw';
import { offsetPieces, startOfDayIn } from '../../zoned-time';
import { timeZoneOf } from './workshops';

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
		bucket: Bucket,
		local = 't.created_at'
	) => `SELECT t.meter_name, ${PERIOD[bucket](local)} AS period, COUNT(*) AS tests,
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

/** A period's key from `at`, the SQL of a test's time on the workshop's clock. */
const PERIOD: Record<Bucket, (at: string) => string> = {
	day: (at) => `DATE_FORMAT(${at}, '%Y-%m-%d')`,
	week: (at) => `DATE_FORMAT(DATE_SUB(DATE(${at}), INTERVAL WEEKDAY(${at}) DAY), '%Y-%m-%d')`,
	month: (at) => `DATE_FORMAT(${at}, '%Y-%m-01')`
};

/**
 * The SQL of `t.created_at` on the clocks of the workshop's zone over the range: the UTC time
 * plus the zone's offset, which changes at most at the instants `offsetPieces` finds (numbers
 * and times computed here, never typed by a user). `t.created_at` itself for a zone on UTC.
 */
export function localTimeSql(startMs: number, endMs: number, zone: string): string {
	const pieces = offsetPieces(startMs, endMs, zone);
	if (pieces.length === 1) return pieces[0].offset ? `(t.created_at + INTERVAL ${pieces[0].offset} SECOND)` : 't.created_at';
	const cases = pieces
		.map((p) => (p.until === null ? `ELSE ${p.offset}` : `WHEN t.created_at < '${sqlDateTime(new Date(p.until))}' THEN ${p.offset}`))
		.join(' ');
	return `(t.created_at + INTERVAL (CASE ${cases} END) SECOND)`;
}

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

/**
 * The range's bounds as UTC DATETIME text: from the first day's start to the start of the day
 * after the last, days on the clocks of `zone` (the workshop's).
 */
export function boundsOf(q: Pick<OverviewQuery, 'from' | 'to'>, today = new Date(), zone = 'UTC') {
	const { from, to } = daysOf(q, today, zone);
	if (from > to) throw new ValidationError({ from: 'The start is after the end' });
	const after = new Date(Date.parse(`${to}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10);
	const startMs = startOfDayIn(from, zone);
	const endMs = startOfDayIn(after, zone);
	return { from, to, start: sqlDateTime(new Date(startMs)), end: sqlDateTime(new Date(endMs)), startMs, endMs };
}

/** The overview of the actor's workshop for a parsed query. */
export async function readOverview(actor: Actor, q: OverviewQuery, today = new Date()) {
	const zone = await timeZoneOf(actor.workshopId);
	const { from, to, start, end, startMs, endMs } = boundsOf(q, today, zone);
	const bucket = bucketFor(from, to);
	const args = [actor.workshopId, start, end];
	const [rows, leadRows, circuitRows, users] = await Promise.all([
		db().query<GroupRow>(OVERVIEW_SQL.groups, { replacements: args, type: QueryTypes.SELECT }),
		db().query<Record<string, unknown>>(OVERVIEW_SQL.leadZero(bucket, localTimeSql(startMs, endMs, zone)), {
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
