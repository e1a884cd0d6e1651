/** Append-only records made on the phone: readings, spark tests, swap tests, sign-offs. */
import { z } from 'zod';
import { optionalText, uuidRef } from './common';
import { SIGNOFF_DECISIONS, SIGNOFF_MODES } from '../tests/signoff';
import { CIRCUIT_KINDS, circuitInputs } from '../flow/circuit';

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

/**
 * A circuit test (battery, parasitic draw, voltage drop, charging, relay, crank or cam sensor):
 * its kind, the figures typed (limits included) and what the phone showed; the server judges
 * the same figures again with `judgeCircuit` and keeps both.
 */
export const circuitTestCreate = z.object({
	jobId: uuidRef,
	testId: uuidRef.nullable().optional(),
	kind: z.enum(CIRCUIT_KINDS),
	inputs: circuitInputs,
	deviceResult: z.object({ verdict: z.string().max(20) }).passthrough().nullable().optional(),
	note: optionalText(500)
});

/** A send-back always says what the apprentice should do again. */
function noteWhenSentBack(v: { decision: string; note?: string | null }, ctx: z.RefinementCtx) {
	if (v.decision === 'sent_back' && !v.note)
		ctx.addIssue({
			code: 'custom',
			path: ['note'],
			message: 'Say what the apprentice should do again'
		});
}

/**
 * A lead's decision on an apprentice's test: signed off (the default), or sent back with a
 * note the apprentice sees on the job. Who decided is the signed-in user, never a field.
 */
export const signoffCreate = z
	.object({
		testId: uuidRef,
		mode: z.enum(SIGNOFF_MODES),
		decision: z.enum(SIGNOFF_DECISIONS).default('signed'),
		note: optionalText(500)
	})
	.superRefine(noteWhenSentBack);

/** The same decision made at the desk (`POST /api/tests/:id/signoff`, the job page's form). */
export const signoffDecision = z
	.object({
		mode: z.enum(SIGNOFF_MODES).default('remote'),
		decision: z.enum(SIGNOFF_DECISIONS, { error: 'Sign it off or send it back' }).default('signed'),
		note: optionalText(500)
	})
	.superRefine(noteWhenSentBack);
