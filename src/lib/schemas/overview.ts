/**
 * The lead's overview query (the page's URL, the JSON API and the CSV export share it):
 * a date range of tests (UTC days, both ends included), a filter and a sort per table.
 */
import { z } from 'zod';
import { isoDayIn } from '../zoned-time';
import { sortParam } from './common';

const day = z
	.string()
	.regex(/^\d{4}-\d{2}-\d{2}$/, 'A date as year-month-day')
	.refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)), 'Not a date');

export const PART_SORTS = ['part', 'tests', 'outOfSpec', 'cantTell', 'ok', 'failRate'] as const;
export const METER_SORTS = [
	'meter',
	'tests',
	'readings',
	'leadAvg',
	'leadLatest',
	'unresolvedRate'
] as const;
export const PEOPLE_SORTS = ['name', 'role', 'tests', 'finished', 'cantTellRate', 'waiting'] as const;
export const CIRCUIT_SORTS = ['kind', 'tests', 'outOfSpec', 'cantTell', 'ok', 'differ', 'waiting'] as const;
export const OVERVIEW_TABLES = ['parts', 'meters', 'lead-zero', 'circuits', 'people'] as const;
export type OverviewTable = (typeof OVERVIEW_TABLES)[number];

/** How many days the overview covers when no start is given (the last 90 days). */
export const DEFAULT_DAYS = 90;

const filterText = z.string().trim().max(60, 'At most 60 characters').default('');

export const overviewQuery = z
	.object({
		from: day.optional(),
		to: day.optional(),
		part: filterText,
		meter: filterText,
		role: z.enum(['all', 'technician', 'apprentice', 'lead', 'owner']).default('all'),
		partsSort: sortParam(PART_SORTS, '-tests'),
		metersSort: sortParam(METER_SORTS, 'meter'),
		peopleSort: sortParam(PEOPLE_SORTS, '-tests'),
		circuitsSort: sortParam(CIRCUIT_SORTS, 'kind')
	})
	.refine((q) => !q.from || !q.to || q.from <= q.to, {
		message: 'The start is after the end',
		path: ['from']
	});
export type OverviewQuery = z.output<typeof overviewQuery>;

export const overviewCsvQuery = z.object({
	table: z.enum(OVERVIEW_TABLES, { error: `One of ${OVERVIEW_TABLES.join(', ')}` }),
	delimiter: z.enum(['comma', 'semicolon']).default('comma')
});

/** The days of a query: its own, or the last `DEFAULT_DAYS` up to `today` (on the clocks of `zone`). */
export function daysOf(
	q: Pick<OverviewQuery, 'from' | 'to'>,
	today = new Date(),
	zone = 'UTC'
): { from: string; to: string } {
	const to = q.to ?? isoDayIn(today, zone);
	const back = new Date(Date.parse(`${to}T00:00:00Z`) - (DEFAULT_DAYS - 1) * 86_400_000);
	return { from: q.from ?? back.toISOString().slice(0, 10), to };
}
