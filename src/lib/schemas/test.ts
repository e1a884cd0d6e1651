/** A test of one component on one job, with its pinned snapshot (DESIGN §2.4, §5). */
import { z } from 'zod';
import { optionalText, uuidRef } from './common';

/** One range of the technician's meter, from its accuracy table; values in base units. */
export const meterRange = z.object({
	label: z.string().trim().min(1, 'Name the range').max(30),
	resolution: z.number().positive('Resolution must be above zero'),
	pctOfReading: z.number().min(0).max(20),
	counts: z.number().int().min(0).max(1000),
	maxReading: z.number().positive().nullable().optional()
});

/**
 * The meter as set up for this test: its ranges, and either the lead resistance to
 * subtract (leads shorted and read once per shift) or relative mode — never both, since
 * relative mode already takes the leads off and subtracting again would count them twice.
 */
export const meterSnapshot = z
	.object({
		name: z.string().trim().min(1).max(60).default('My meter'),
		ranges: z.array(meterRange).min(1, 'Add at least one range').max(12),
		leadResistance: z.number().min(0).max(10).default(0),
		relativeMode: z.boolean().default(false)
	})
	.refine((m) => !(m.relativeMode && m.leadResistance > 0), {
		message: 'Use relative mode or subtract the leads, never both',
		path: ['leadResistance']
	});
export type MeterSetup = z.output<typeof meterSnapshot>;
export type MeterRangeSpec = z.output<typeof meterRange>;

export const temperatureSnapshot = z.discriminatedUnion('mode', [
	z.object({ mode: z.literal('measured'), tempC: z.number().min(-40).max(200) }),
	z.object({ mode: z.enum(['overnight', 'warm', 'just_run', 'unknown']) })
]);

export const testCreate = z.object({
	jobId: uuidRef,
	componentId: uuidRef.nullable().optional(),
	sheetId: uuidRef.nullable().optional(),
	sheetVersion: z.number().int().positive().nullable().optional(),
	partNumber: optionalText(60),
	position: optionalText(20),
	meter: meterSnapshot.nullable().optional(),
	temperature: temperatureSnapshot.nullable().optional(),
	state: z.enum(['in_progress', 'done', 'abandoned']).default('in_progress'),
	notes: optionalText(5000),
	/**
	 * A re-test after the repair: the first test of the same part and positions on the same
	 * job (set when the re-test starts, never changed after).
	 */
	retestOf: uuidRef.nullable().optional()
});
export const testPatch = testCreate.omit({ jobId: true, retestOf: true }).partial();
