/**
 * The overview's tables as CSV, with the spec library's conventions (`csv-layout.ts`): a
 * byte-order mark, one header line of snake_case names, `,` with decimal points or `;` with
 * decimal commas, CRLF line ends, and free text guarded against spreadsheet formulas.
 * Rates are percentages (one decimal), lead zero in ohms (four decimals, 0.1 mΩ). Pure.
 */
import { guardFormula, writeCsv } from '../csv';
import { plainNumber } from '../library/limits';
import { ROLE_LABELS } from '../labels';
import type { OverviewTable } from '../schemas/overview';
import type { OverviewTables } from './tables';

type Cell = string | number | null;
const HEADERS: Record<OverviewTable, string[]> = {
	parts: ['part_number', 'tests', 'out_of_spec', 'cant_tell', 'ok', 'no_result', 'out_of_spec_pct'],
	meters: [
		'meter',
		'tests',
		'readings',
		'relative_mode_tests',
		'lead_zero_avg_ohm',
		'lead_zero_min_ohm',
		'lead_zero_max_ohm',
		'lead_zero_latest_ohm',
		'range_could_not_resolve',
		'range_could_not_resolve_pct'
	],
	'lead-zero': [
		'meter',
		'period_start',
		'tests',
		'lead_zero_avg_ohm',
		'lead_zero_min_ohm',
		'lead_zero_max_ohm'
	],
	circuits: ['test', 'kind', 'tests', 'out_of_spec', 'cant_tell', 'ok', 'phone_differed', 'waiting_signoff', 'out_of_spec_pct'],
	people: [
		'name',
		'role',
		'tests',
		'finished',
		'with_result',
		'cant_tell',
		'cant_tell_pct',
		'waiting_signoff'
	]
};

const pct = (r: number | null) => (r == null ? null : Math.round(r * 1000) / 10);
const ohm = (v: number | null) => (v == null ? null : Math.round(v * 10_000) / 10_000);

function lines(table: OverviewTable, t: OverviewTables): Cell[][] {
	switch (table) {
		case 'parts':
			return t.parts.map((r) => [
				r.partNumber ?? '',
				r.tests,
				r.outOfSpec,
				r.cantTell,
				r.ok,
				r.noResult,
				pct(r.failRate)
			]);
		case 'meters':
			return t.meters.map((r) => [
				r.meterName ?? '',
				r.tests,
				r.readings,
				r.relativeTests,
				ohm(r.leadAvg),
				ohm(r.leadMin),
				ohm(r.leadMax),
				ohm(r.leadLatest),
				r.unresolved,
				pct(r.unresolvedRate)
			]);
		case 'lead-zero':
			return t.leadZero.flatMap((s) =>
				s.points.map((p) => [
					s.meterName ?? '',
					p.period,
					p.tests,
					ohm(p.avgOhms),
					ohm(p.minOhms),
					ohm(p.maxOhms)
				])
			);
		case 'circuits':
			return t.circuits.map((r) => [r.title, r.kind, r.tests, r.outOfSpec, r.cantTell, r.ok, r.differ, r.waiting, pct(r.failRate)]);
		case 'people':
			return t.people.map((r) => [
				r.name,
				r.role ? ROLE_LABELS[r.role] : '',
				r.tests,
				r.finished,
				r.withResult,
				r.cantTell,
				pct(r.cantTellRate),
				r.waiting
			]);
	}
}

/** One table of the overview as CSV text (`;` gives decimal commas). */
export function overviewCsv(
	table: OverviewTable,
	tables: OverviewTables,
	delimiter: ',' | ';' = ','
): string {
	const cell = (c: Cell) =>
		c == null ? '' : typeof c === 'number' ? plainNumber(c, delimiter === ';') : guardFormula(c);
	return (
		'\uFEFF' +
		writeCsv([HEADERS[table], ...lines(table, tables).map((l) => l.map(cell))], delimiter)
	);
}
