/** Append-only records made on the phone: readings, spark tests, swap tests, sign-offs. */
import { z } from 'zod';
import { optionalText, uuidRef } from './common';

export const sample = z.object({
	value: z.union([z.number().finite(), z.literal('OL')]),
	unit: z.string().min(1).max(4)
});

/** A visual check's finding: OK or not, with a note of what was seen. */
export const visualFinding = z.object({ ok: z.boolean(), note: optionalText(500) });

/** A reading: samples of a measured check, or the finding of a visual check (no samples). */
export const readingCreate = z
	.object({
		testId: uuidRef,
		checkKey: z.string().regex(/^[a-z0-9_]{1,40}$/),
		position: optionalText(20),
		samples: z.array(sample).max(20),
		visual: visualFinding.nullable().optional(),
		/** Which range of the test's meter the samples were read on. */
		rangeLabel: z.string().max(30).nullable().optional(),
		/** What the phone showed; the server recomputes and keeps both. */
		deviceResult: z
			.object({ value: z.number().nullable(), verdict: z.string().max(20) })
			.passthrough()
			.nullable()
			.optional()
	})
	.superRefine((r, ctx) => {
		if (r.visual == null && r.samples.length === 0)
			ctx.addIssue({ code: 'custom', path: ['samples'], message: 'At least one sample' });
		if (r.visual != null && r.samples.length > 0)
			ctx.addIssue({ code: 'custom', path: ['samples'], message: 'A visual check has no samples' });
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
