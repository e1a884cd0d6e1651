/** A test of one component on one job, with its pinned snapshot (DESIGN §2.4, §5). */
import { z } from 'zod';
import { optionalText, uuidRef } from './common';

/** What a meter range measures (a voltage drop is read on a voltage range). */
export const RANGE_QUANTITIES = ['resistance', 'voltage', 'current'] as const;

/**
 * One range of the technician's meter, from its accuracy table; values in base units (Ω, V,
 * A). Messages are written for the person filling in the meters form.
 */
export const meterRange = z.object({
	label: z.string().trim().min(1, 'Name the range').max(30, 'At most 30 characters for the name'),
	quantity: z.enum(RANGE_QUANTITIES, { error: 'Choose ohms, volts or amps' }).default('resistance'),
	resolution: z
		.number({ error: 'Enter the resolution as a number, e.g. 0,01' })
		.positive('The resolution must be above zero'),
	pctOfReading: z
		.number({ error: 'Enter the % of reading as a number, e.g. 0,5' })
		.min(0, 'The % of reading cannot be below 0')
		.max(20, 'The % of reading is at most 20'),
	counts: z
		.number({ error: 'Enter the counts as a whole number, e.g. 2' })
		.int('The counts are a whole number')
		.min(0, 'The counts cannot be below 0')
		.max(1000, 'The counts are at most 1000'),
	maxReading: z
		.number({ error: 'Enter the largest reading as a number' })
		.positive('The largest reading must be above zero')
		.nullable()
		.optional()
});

/**
 * The meter as set up for this test: its ranges, and either the lead resistance to
 * subtract or relative mode — never both, since relative mode already takes the leads off
 * and subtracting again would count them twice. The leads are read when the test starts (at
 * 0.5 Ω a 0.1 Ω drift is 20 %), and again when a reading shows they changed: `leadReadAt`
 * is when. In relative mode `zeroReading` is what the leads read when the meter was zeroed
 * (its error is carried like a lead reading's).
 */
export const meterSnapshot = z
	.object({
		name: z.string().trim().min(1).max(60).default('My meter'),
		ranges: z.array(meterRange).min(1, 'Add at least one range').max(24),
		leadResistance: z.number().min(0).max(10).default(0),
		relativeMode: z.boolean().default(false),
		zeroReading: z.number().min(0).max(10).nullable().optional(),
		leadReadAt: z.iso.datetime({ offset: true }).nullable().optional()
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
