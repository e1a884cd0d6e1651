/** Append-only records made on the phone: readings, spark tests, swap tests, sign-offs. */
import { z } from 'zod';
import { optionalText, uuidRef } from './common';

export const sample = z.object({
	value: z.union([z.number().finite(), z.literal('OL')]),
	unit: z.string().min(1).max(4)
});

export const readingCreate = z.object({
	testId: uuidRef,
	checkKey: z.string().regex(/^[a-z0-9_]{1,40}$/),
	position: optionalText(20),
	samples: z.array(sample).min(1, 'At least one sample').max(20),
	/** Which range of the test's meter the samples were read on. */
	rangeLabel: z.string().max(30).nullable().optional(),
	/** What the phone showed; the server recomputes and keeps both. */
	deviceResult: z
		.object({ value: z.number().nullable(), verdict: z.string().max(20) })
		.passthrough()
		.nullable()
		.optional()
});

export const sparkTestCreate = z.object({
	jobId: uuidRef,
	testId: uuidRef.nullable().optional(),
	position: z.string().trim().min(1).max(20),
	gapMm: z.number().positive().max(30),
	outcome: z.enum(['go', 'weak', 'none']),
	note: optionalText(500)
});

const counts = z.record(z.string().max(20), z.number().int().min(0).max(100000));
export const swapTestCreate = z.object({
	jobId: uuidRef,
	testId: uuidRef.nullable().optional(),
	fromPosition: z.string().trim().min(1).max(20),
	toPosition: z.string().trim().min(1).max(20),
	beforeCounts: counts,
	afterCounts: counts,
	conclusion: z.enum(['fault_followed', 'fault_stayed', 'inconclusive']),
	note: optionalText(500)
});

export const signoffCreate = z.object({
	testId: uuidRef,
	mode: z.enum(['witnessed', 'remote']),
	note: optionalText(500)
});
