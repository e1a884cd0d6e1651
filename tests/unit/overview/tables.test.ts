import { describe, expect, it } from 'vitest';
import { overviewCsv } from '../../../src/lib/overview/csv';
import {
	bucketFor,
	leadSeries,
	meterRows,
	overviewTables,
	partRows,
	peopleRows,
	sortRows,
	type LeadPoint,
	type TestGroup
} from '../../../src/lib/overview/tables';
import { parseCsv } from '../../../src/lib/csv';

// Invented part numbers, meters and people. Every expected figure below is worked by hand
// from these groups: a rate is a plain ratio (count over count), an average of averages is
// weighted by the number of tests in each period (arithmetic mean of the pooled values).
const g = (over: Partial<TestGroup>): TestGroup => ({
	partNumber: 'ZX-1',
	technicianId: 't',
	state: 'done',
	meterName: 'Bench A',
	tests: 0,
	outOfSpec: 0,
	cantTell: 0,
	ok: 0,
	readings: 0,
	unresolved: 0,
	rangeKnown: 0,
	relative: 0,
	waiting: 0,
	...over
});
const GROUPS: TestGroup[] = [
	g({ tests: 4, outOfSpec: 1, cantTell: 1, ok: 2, readings: 16, unresolved: 2, rangeKnown: 16 }),
	g({ state: 'in_progress', tests: 2, ok: 1, readings: 3, rangeKnown: 3 }), // one test not judged yet
	g({
		partNumber: 'ZX-2',
		technicianId: 'a',
		meterName: 'Bench B',
		tests: 3,
		cantTell: 2,
		ok: 1,
		readings: 6,
		unresolved: 3,
		rangeKnown: 4,
		relative: 1,
		waiting: 2
	}),
	g({
		partNumber: 'ZX-2',
		technicianId: 'a',
		meterName: 'Bench B',
		state: 'in_progress',
		tests: 1
	}),
	g({
		partNumber: null,
		technicianId: 'gone',
		meterName: null,
		tests: 1,
		outOfSpec: 1,
		readings: 1
	})
];
const POINTS: LeadPoint[] = [
	{
		meterName: 'Bench A',
		period: '2026-11-23',
		tests: 2,
		avgOhms: 0.1,
		minOhms: 0.09,
		maxOhms: 0.11
	},
	{
		meterName: 'Bench A',
		period: '2026-11-16',
		tests: 6,
		avgOhms: 0.14,
		minOhms: 0.12,
		maxOhms: 0.2
	},
	{ meterName: 'Bench B', period: '2026-11-23', tests: 2, avgOhms: 0.3, minOhms: 0.3, maxOhms: 0.3 }
];
const PEOPLE = [
	{ id: 't', name: 'Ansel Brook', role: 'technician' as const },
	{ id: 'a', name: 'Wren Tolley', role: 'apprentice' as const }
];

describe('the part-number table', () => {
	it('adds up tests per part, with the tests not judged yet apart and the failure rate over judged tests', () => {
		const rows = partRows(GROUPS);
		expect(rows.find((r) => r.partNumber === 'ZX-1')).toEqual({
			partNumber: 'ZX-1',
			tests: 6,
			outOfSpec: 1,
			cantTell: 1,
			ok: 3,
			noResult: 1,
			failRate: 1 / 5
		});
		expect(rows.find((r) => r.partNumber === 'ZX-2')).toMatchObject({
			tests: 4,
			outOfSpec: 0,
			noResult: 1,
			failRate: 0
		});
		expect(rows.find((r) => r.partNumber === null)).toMatchObject({ tests: 1, failRate: 1 });
	});

	it('has no failure rate for a part none of whose tests has a result', () => {
		expect(partRows([g({ tests: 2 })])[0].failRate).toBeNull();
	});
});

describe('the meter table', () => {
	it('gives the lead zero averaged over its tests, its extremes, the latest period, and the unresolved share of known readings', () => {
		const a = meterRows(GROUPS, POINTS).find((r) => r.meterName === 'Bench A')!;
		expect(a.tests).toBe(6);
		expect(a.readings).toBe(19);
		expect(a.leadAvg).toBeCloseTo((0.1 * 2 + 0.14 * 6) / 8, 12); // 0.13
		expect(a.leadMin).toBe(0.09);
		expect(a.leadMax).toBe(0.2);
		expect(a.leadLatest).toBe(0.1); // the week of 23 Nov is the later one
		expect(a.unresolved).toBe(2);
		expect(a.unresolvedRate).toBeCloseTo(2 / 19, 12);
		const b = meterRows(GROUPS, POINTS).find((r) => r.meterName === 'Bench B')!;
		expect(b).toMatchObject({
			relativeTests: 1,
			unresolved: 3,
			unresolvedRate: 3 / 4,
			leadAvg: 0.3
		});
	});

	it('orders each meter’s lead zero oldest first', () => {
		expect(leadSeries(POINTS)[0].points.map((p) => p.period)).toEqual(['2026-11-16', '2026-11-23']);
	});
});

describe('the people table', () => {
	it('counts tests and finished tests per person and the can’t-tell share of those with a result', () => {
		const rows = peopleRows(GROUPS, PEOPLE);
		expect(rows.find((r) => r.id === 't')).toMatchObject({
			name: 'Ansel Brook',
			role: 'technician',
			tests: 6,
			finished: 4,
			withResult: 5,
			cantTell: 1,
			cantTellRate: 0.2
		});
		expect(rows.find((r) => r.id === 'a')).toMatchObject({
			role: 'apprentice',
			tests: 4,
			finished: 3,
			cantTell: 2,
			cantTellRate: 2 / 3
		});
		expect(rows.find((r) => r.id === 'gone')).toMatchObject({
			name: 'Someone no longer in the workshop',
			role: null
		});
	});

	it('adds up the finished tests waiting for a lead’s sign-off per person', () => {
		const rows = peopleRows(GROUPS, PEOPLE);
		expect(rows.find((r) => r.id === 'a')!.waiting).toBe(2);
		expect(rows.find((r) => r.id === 't')!.waiting).toBe(0);
		expect(
			peopleRows(
				[...GROUPS, g({ technicianId: 'a', partNumber: 'ZX-3', tests: 2, waiting: 1 })],
				PEOPLE
			).find((r) => r.id === 'a')!.waiting
		).toBe(3);
	});
});

describe('sorting and filtering', () => {
	it('sorts numbers both ways with empty values last and ties by name', () => {
		const rows = [
			{ n: 'b', v: 2 },
			{ n: 'a', v: 2 },
			{ n: 'c', v: null },
			{ n: 'd', v: 5 }
		];
		expect(sortRows(rows, '-v', (r) => r.n).map((r) => r.n)).toEqual(['d', 'a', 'b', 'c']);
		expect(sortRows(rows, 'v', (r) => r.n).map((r) => r.n)).toEqual(['a', 'b', 'd', 'c']);
	});

	it('filters parts and meters by text, people by role, and keeps only the shown meters’ lead zero', () => {
		const t = overviewTables(
			{
				part: 'zx-2',
				meter: 'bench b',
				role: 'apprentice',
				partsSort: '-failRate',
				metersSort: 'meter',
				peopleSort: 'name'
			},
			GROUPS,
			POINTS,
			PEOPLE
		);
		expect(t.parts.map((r) => r.partNumber)).toEqual(['ZX-2']);
		expect(t.meters.map((r) => r.meterName)).toEqual(['Bench B']);
		expect(t.leadZero.map((s) => s.meterName)).toEqual(['Bench B']);
		expect(t.people.map((r) => r.name)).toEqual(['Wren Tolley']);
	});

	it('sorts the part table by part number when asked', () => {
		const t = overviewTables(
			{
				part: '',
				meter: '',
				role: 'all',
				partsSort: '-part',
				metersSort: '-meter',
				peopleSort: '-tests'
			},
			GROUPS,
			POINTS,
			PEOPLE
		);
		expect(t.parts.map((r) => r.partNumber)).toEqual(['ZX-2', 'ZX-1', null]);
		expect(t.meters.map((r) => r.meterName)).toEqual(['Bench B', 'Bench A', null]);
	});
});

describe('periods', () => {
	it('averages by day up to 31 days, by week up to a year, by month beyond', () => {
		expect(bucketFor('2026-11-01', '2026-12-01')).toBe('day'); // 31 days, both ends included
		expect(bucketFor('2026-10-31', '2026-12-01')).toBe('week');
		expect(bucketFor('2025-12-02', '2026-12-02')).toBe('week'); // 366 days
		expect(bucketFor('2025-12-01', '2026-12-02')).toBe('month');
	});
});

describe('CSV', () => {
	const tables = overviewTables(
		{
			part: '',
			meter: '',
			role: 'all',
			partsSort: 'part',
			metersSort: 'meter',
			peopleSort: 'name'
		},
		GROUPS,
		POINTS,
		PEOPLE
	);

	it('writes the part table with `;` and decimal commas, a byte-order mark and CRLF lines', () => {
		const text = overviewCsv('parts', tables, ';');
		expect(
			text.startsWith(
				'\uFEFFpart_number;tests;out_of_spec;cant_tell;ok;no_result;out_of_spec_pct\r\n'
			)
		).toBe(true);
		expect(text).toContain('\r\nZX-1;6;1;1;3;1;20\r\n');
		const { rows } = parseCsv(overviewCsv('meters', tables, ';'));
		const a = rows.find((r) => r.cells[0] === 'Bench A')!.cells;
		expect(a.slice(4, 8)).toEqual(['0,13', '0,09', '0,2', '0,1']); // ohms
		expect(a[9]).toBe('10,5'); // 2 of 19 = 10.526… % to one decimal
	});

	it('writes decimal points with `,`, and the lead zero per period', () => {
		const { rows } = parseCsv(overviewCsv('lead-zero', tables, ','));
		expect(rows[0].cells).toEqual([
			'meter',
			'period_start',
			'tests',
			'lead_zero_avg_ohm',
			'lead_zero_min_ohm',
			'lead_zero_max_ohm'
		]);
		expect(rows[1].cells).toEqual(['Bench A', '2026-11-16', '6', '0.14', '0.12', '0.2']);
		const people = parseCsv(overviewCsv('people', tables, ',')).rows;
		expect(people.find((r) => r.cells[0] === 'Wren Tolley')!.cells).toEqual([
			'Wren Tolley',
			'Apprentice',
			'4',
			'3',
			'3',
			'2',
			'66.7',
			'2'
		]);
	});

	it('guards text a spreadsheet would run as a formula (OWASP, "CSV Injection")', () => {
		const t = overviewTables(
			{
				part: '',
				meter: '',
				role: 'all',
				partsSort: 'part',
				metersSort: 'meter',
				peopleSort: 'name'
			},
			[g({ partNumber: '=HYPERLINK("x")', tests: 1 })],
			[],
			[]
		);
		expect(parseCsv(overviewCsv('parts', t, ',')).rows[1].cells[0]).toBe('\'=HYPERLINK("x")');
	});
});
