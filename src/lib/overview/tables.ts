/**
 * The lead's overview as tables, from the few grouped rows the database answers: per part
 * number, per meter (with its lead zero over time) and per person. Pure: the server builds
 * the page, the JSON answer and the CSV files with these functions, and the unit tests
 * check them on hand-worked figures.
 *
 * A test's result is the worst of its readings as the workshop judged them: out of spec
 * when any reading is under or over spec (open included), else can't tell when any is
 * too close to call (or depends on an unclear temperature), else OK when any reading is
 * within spec; a test with no reading judged has no result yet.
 */
import type { OverviewQuery } from '../schemas/overview';
import type { Role } from '../roles';
import { KINDS, type CircuitKind } from '../flow/circuit';

/** Tests of one part number, person, state and meter, as the database groups them. */
export type TestGroup = {
	partNumber: string | null;
	technicianId: string | null;
	state: 'in_progress' | 'done';
	meterName: string | null;
	tests: number;
	outOfSpec: number;
	cantTell: number;
	ok: number;
	/** Readings of these tests. */
	readings: number;
	/** Readings whose range could not tell them from the spec's limits. */
	unresolved: number;
	/** Readings for which that is known (the test pinned a sheet). */
	rangeKnown: number;
	/** Tests read in relative mode (the meter took the leads off itself). */
	relative: number;
	/** Finished tests of an apprentice waiting for a lead's sign-off. */
	waiting: number;
};

/**
 * Circuit tests (battery, parasitic draw, voltage drop, charging, relay, crank or cam sensor)
 * of one kind by one person, as the database groups them. Each is finished when saved and
 * has the workshop's verdict: out of spec (under, over, not OK), can't tell (charge and
 * re-test included) or OK.
 */
export type CircuitGroup = {
	kind: string;
	technicianId: string | null;
	tests: number;
	outOfSpec: number;
	cantTell: number;
	ok: number;
	/** Tests where the phone's result differed from the workshop's own judgement. */
	differ: number;
	/** An apprentice's tests with no decision of a lead yet. */
	waiting: number;
};

export type CircuitRow = {
	kind: string;
	/** The kind in words ("Battery test"). */
	title: string;
	tests: number;
	outOfSpec: number;
	cantTell: number;
	ok: number;
	differ: number;
	waiting: number;
	/** Out of spec over the tests (0–1), null when none. */
	failRate: number | null;
};

/** Lead zero (ohms, leads subtracted) of one meter over one period. */
export type LeadPoint = {
	meterName: string | null;
	/** First day of the period, YYYY-MM-DD. */
	period: string;
	tests: number;
	avgOhms: number;
	minOhms: number;
	maxOhms: number;
};

export type Person = { id: string; name: string; role: Role };

export type PartRow = {
	partNumber: string | null;
	tests: number;
	outOfSpec: number;
	cantTell: number;
	ok: number;
	noResult: number;
	/** Out of spec over the tests with a result (0–1), null when none has one. */
	failRate: number | null;
};

export type MeterRow = {
	meterName: string | null;
	tests: number;
	readings: number;
	relativeTests: number;
	leadAvg: number | null;
	leadMin: number | null;
	leadMax: number | null;
	/** The average of the meter's latest period. */
	leadLatest: number | null;
	unresolved: number;
	/** Unresolved over the readings where it is known (0–1), null when none is known. */
	unresolvedRate: number | null;
};

export type PersonRow = {
	id: string | null;
	name: string;
	role: Role | null;
	tests: number;
	finished: number;
	withResult: number;
	cantTell: number;
	/** Can't tell over the tests with a result (0–1), null when none has one. */
	cantTellRate: number | null;
	/** Finished tests waiting for a lead's sign-off (an apprentice's; 0 for everyone else). */
	waiting: number;
};

export type LeadSeries = { meterName: string | null; points: LeadPoint[] };
export type Bucket = 'day' | 'week' | 'month';

const rate = (n: number, of: number) => (of > 0 ? n / of : null);

/** The period the lead zero is averaged over: days up to a month, weeks up to a year, months beyond. */
export function bucketFor(from: string, to: string): Bucket {
	const days = (Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / 86_400_000 + 1;
	return days <= 31 ? 'day' : days <= 366 ? 'week' : 'month';
}

function sumBy<K>(groups: TestGroup[], keyOf: (g: TestGroup) => K) {
	const out = new Map<K, TestGroup[]>();
	for (const g of groups) {
		const k = keyOf(g);
		const list = out.get(k);
		if (list) list.push(g);
		else out.set(k, [g]);
	}
	return out;
}
const total = (list: TestGroup[], k: keyof TestGroup) =>
	list.reduce((n, g) => n + (g[k] as number), 0);

export function partRows(groups: TestGroup[]): PartRow[] {
	return [...sumBy(groups, (g) => g.partNumber)].map(([partNumber, list]) => {
		const [tests, outOfSpec, cantTell, ok] = (
			['tests', 'outOfSpec', 'cantTell', 'ok'] as const
		).map((k) => total(list, k));
		const judged = outOfSpec + cantTell + ok;
		return {
			partNumber,
			tests,
			outOfSpec,
			cantTell,
			ok,
			noResult: tests - judged,
			failRate: rate(outOfSpec, judged)
		};
	});
}

/** Each meter's lead zero per period, oldest first. */
export function leadSeries(points: LeadPoint[]): LeadSeries[] {
	const by = new Map<string | null, LeadPoint[]>();
	for (const p of points) by.set(p.meterName, [...(by.get(p.meterName) ?? []), p]);
	return [...by]
		.map(([meterName, list]) => ({
			meterName,
			points: list.sort((a, b) => a.period.localeCompare(b.period))
		}))
		.sort((a, b) => (a.meterName ?? '').localeCompare(b.meterName ?? ''));
}

export function meterRows(groups: TestGroup[], points: LeadPoint[]): MeterRow[] {
	const series = new Map(leadSeries(points).map((s) => [s.meterName, s.points]));
	return [...sumBy(groups, (g) => g.meterName)].map(([meterName, list]) => {
		const pts = series.get(meterName) ?? [];
		const leadTests = pts.reduce((n, p) => n + p.tests, 0);
		const unresolved = total(list, 'unresolved');
		return {
			meterName,
			tests: total(list, 'tests'),
			readings: total(list, 'readings'),
			relativeTests: total(list, 'relative'),
			leadAvg: leadTests ? pts.reduce((n, p) => n + p.avgOhms * p.tests, 0) / leadTests : null,
			leadMin: pts.length ? Math.min(...pts.map((p) => p.minOhms)) : null,
			leadMax: pts.length ? Math.max(...pts.map((p) => p.maxOhms)) : null,
			leadLatest: pts.length ? pts[pts.length - 1].avgOhms : null,
			unresolved,
			unresolvedRate: rate(unresolved, total(list, 'rangeKnown'))
		};
	});
}

/** One row per kind of circuit test. */
export function circuitRows(groups: CircuitGroup[]): CircuitRow[] {
	const by = new Map<string, CircuitRow>();
	for (const g of groups) {
		const r = by.get(g.kind) ?? { kind: g.kind, title: KINDS[g.kind as CircuitKind]?.title ?? 'Circuit test', tests: 0, outOfSpec: 0, cantTell: 0, ok: 0, differ: 0, waiting: 0, failRate: null };
		for (const k of ['tests', 'outOfSpec', 'cantTell', 'ok', 'differ', 'waiting'] as const) r[k] += g[k];
		by.set(g.kind, r);
	}
	return [...by.values()].map((r) => ({ ...r, failRate: rate(r.outOfSpec, r.tests) }));
}

/** Each person's tests, their circuit tests counted with them (finished, with a result). */
export function peopleRows(groups: TestGroup[], people: Person[], circuits: CircuitGroup[] = []): PersonRow[] {
	const byId = new Map(people.map((p) => [p.id, p]));
	const asGroups: TestGroup[] = circuits.map((c) => ({
		partNumber: null,
		technicianId: c.technicianId,
		state: 'done',
		meterName: null,
		tests: c.tests,
		outOfSpec: c.outOfSpec,
		cantTell: c.cantTell,
		ok: c.ok,
		readings: 0,
		unresolved: 0,
		rangeKnown: 0,
		relative: 0,
		waiting: c.waiting
	}));
	return [...sumBy([...groups, ...asGroups], (g) => g.technicianId)].map(([id, list]) => {
		const p = id ? byId.get(id) : undefined;
		const [tests, outOfSpec, cantTell, ok] = (
			['tests', 'outOfSpec', 'cantTell', 'ok'] as const
		).map((k) => total(list, k));
		const withResult = outOfSpec + cantTell + ok;
		return {
			id,
			name: p?.name ?? 'Someone no longer in the workshop',
			role: p?.role ?? null,
			tests,
			finished: list.filter((g) => g.state === 'done').reduce((n, g) => n + g.tests, 0),
			withResult,
			cantTell,
			cantTellRate: rate(cantTell, withResult),
			waiting: total(list, 'waiting')
		};
	});
}

/**
 * Sort rows by `sort` (`key` or `-key` for descending); empty values (no rate, no name)
 * always last, ties by the row's name.
 */
export function sortRows<R>(rows: R[], sort: string, nameOf: (r: R) => string): R[] {
	const desc = sort.startsWith('-');
	const key = (desc ? sort.slice(1) : sort) as keyof R;
	return [...rows].sort((a, b) => {
		const x = a[key] as unknown;
		const y = b[key] as unknown;
		if (x == null || y == null) return x == null && y == null ? 0 : x == null ? 1 : -1;
		const c =
			typeof x === 'number' && typeof y === 'number' ? x - y : String(x).localeCompare(String(y));
		return (desc ? -c : c) || nameOf(a).localeCompare(nameOf(b));
	});
}

const matches = (text: string | null, filter: string) =>
	!filter || (text ?? '').toLowerCase().includes(filter.toLowerCase());

/** The three tables and the lead-zero series, filtered and sorted as the query asks. */
export function overviewTables(
	q: Pick<OverviewQuery, 'part' | 'meter' | 'role' | 'partsSort' | 'metersSort' | 'peopleSort'> &
		Partial<Pick<OverviewQuery, 'circuitsSort'>>,
	groups: TestGroup[],
	points: LeadPoint[],
	people: Person[],
	circuitGroups: CircuitGroup[] = []
) {
	const parts = partRows(groups).filter((r) => matches(r.partNumber, q.part));
	const meters = meterRows(groups, points).filter((r) => matches(r.meterName, q.meter));
	const shown = new Set(meters.map((m) => m.meterName));
	const persons = peopleRows(groups, people, circuitGroups).filter(
		(r) => q.role === 'all' || r.role === q.role
	);
	return {
		parts: sortRows(
			parts,
			q.partsSort === 'part' || q.partsSort === '-part'
				? q.partsSort.replace('part', 'partNumber')
				: q.partsSort,
			(r) => r.partNumber ?? ''
		),
		meters: sortRows(meters, q.metersSort.replace('meter', 'meterName'), (r) => r.meterName ?? ''),
		leadZero: leadSeries(points).filter((s) => shown.has(s.meterName)),
		people: sortRows(persons, q.peopleSort, (r) => r.name),
		circuits: sortRows(
			circuitRows(circuitGroups),
			(q.circuitsSort ?? 'kind').replace('kind', 'title'),
			(r) => r.title
		)
	};
}
export type OverviewTables = ReturnType<typeof overviewTables>;
