/**
 * What each mutable entity of the protocol maps to on the server: its aggregate, whose
 * write path and rules (`services/rules.ts`) hold for sync as for every other channel.
 * Append-only entities live in `append.ts`.
 */
import { components, sheets } from '../services/components';
import * as customers from '../services/customers';
import { jobs } from '../services/jobs';
import { quotes } from '../services/quotes';
import { tests } from '../services/tests';
import { vehicles } from '../services/vehicles';

export const AGGREGATES = {
	customer: customers,
	vehicle: vehicles,
	job: jobs,
	test: tests,
	component: components,
	sheet: sheets,
	quote: quotes
} as const;
export type MutableEntity = keyof typeof AGGREGATES;
