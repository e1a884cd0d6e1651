/** Job fields and statuses (DESIGN §2.3). */
import { z } from 'zod';
import { optionalText, requiredText, uuidRef } from './common';

export const JOB_STATUSES = [
	'open',
	'testing',
	'awaiting_authorisation',
	'awaiting_parts',
	'repaired',
	'retested_ok',
	'no_fault_found',
	'closed'
] as const;
export type JobStatus = (typeof JOB_STATUSES)[number];

/** The words shown for each status. */
export const STATUS_LABELS: Record<JobStatus, string> = {
	open: 'Open',
	testing: 'Testing',
	awaiting_authorisation: 'Awaiting authorisation',
	awaiting_parts: 'Awaiting parts',
	repaired: 'Repaired',
	retested_ok: 'Re-tested OK',
	no_fault_found: 'No fault found',
	closed: 'Closed'
};

export const faultCode = z.object({
	code: z
		.string()
		.trim()
		.toUpperCase()
		.regex(/^[A-Z0-9]{3,8}$/, 'A code like P0301'),
	text: z.string().trim().max(200).default('')
});

export const jobCreate = z.object({
	number: z.number().int().positive().optional(),
	customerId: uuidRef.nullable().optional(),
	vehicleId: uuidRef.nullable().optional(),
	complaint: requiredText(2000, 'Describe the complaint'),
	location: optionalText(200),
	assigneeId: uuidRef.nullable().optional(),
	status: z.enum(JOB_STATUSES).default('open'),
	codesBefore: z.array(faultCode).max(50).default([]),
	codesAfter: z.array(faultCode).max(50).default([]),
	notes: optionalText(5000)
});

export const jobPatch = jobCreate.partial();
