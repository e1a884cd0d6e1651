/** Job fields and statuses (DESIGN §2.3). */
import { z } from 'zod';
import {
	formRef,
	formText,
	optionalText,
	pageParam,
	pageSizeParam,
	requiredText,
	searchParam,
	sortParam,
	uuidRef,
	patchOf
} from './common';

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
	open: 'Booked in',
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
		.regex(/^[A-Z0-9]{3,8}$/, 'A code like P0301: 3 to 8 letters and digits'),
	text: z.string().trim().max(200, 'At most 200 characters').default('')
});

/** A new job's fields. Its number is the server's (never taken from a client). */
export const jobCreate = z.object({
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

export const jobPatch = patchOf(jobCreate);

/** Which list of fault codes: read before the work, or after it. */
export const CODE_LISTS = { before: 'codesBefore', after: 'codesAfter' } as const;
export type CodeList = keyof typeof CODE_LISTS;

/**
 * The usual next status, offered as the main action (any other may still be chosen):
 * open → testing → awaiting authorisation → awaiting parts → repaired → re-tested OK →
 * closed; no fault found → closed. A closed job has none.
 */
export const NEXT_STATUS: Record<JobStatus, JobStatus | null> = {
	open: 'testing',
	testing: 'awaiting_authorisation',
	awaiting_authorisation: 'awaiting_parts',
	awaiting_parts: 'repaired',
	repaired: 'retested_ok',
	retested_ok: 'closed',
	no_fault_found: 'closed',
	closed: null
};

/** `POST /api/jobs/:id/status` body. */
export const jobStatusChange = z.object({
	status: z.enum(JOB_STATUSES, { error: 'Choose a status' }),
	baseVersion: z.number({ error: 'The version you saw' }).int().min(1)
});

export const JOB_SORTS = ['number', 'created', 'updated', 'status', 'customer'] as const;
const day = z.iso.date({ error: 'A date like 2026-12-01' });

/**
 * `GET /api/jobs` query. `status`: one status, `active` (all but closed, the default) or
 * `all`; `assignee`: a user id, `me`, `none` or `any` (technicians and apprentices only ever
 * see their own jobs); `from`/`to`: days the job was opened (UTC, inclusive).
 */
export const jobListQuery = z.object({
	q: searchParam,
	status: z
		.enum([...JOB_STATUSES, 'active', 'all'], { error: 'A status, active or all' })
		.default('active'),
	assignee: z
		.union([z.enum(['me', 'none', 'any']), uuidRef], { error: 'me, none, any or a user id' })
		.default('any'),
	vehicle: uuidRef.optional(),
	customer: uuidRef.optional(),
	from: day.optional(),
	to: day.optional(),
	sort: sortParam(JOB_SORTS, '-number'),
	page: pageParam,
	pageSize: pageSizeParam(50)
});
export type JobListQuery = z.output<typeof jobListQuery>;

/** The job form's fields as the schema's input (only the fields the form shows). */
export function readJobForm(fd: FormData) {
	const out: Record<string, unknown> = {
		complaint: formText(fd, 'complaint'),
		location: formText(fd, 'location'),
		notes: formText(fd, 'notes')
	};
	for (const k of ['customerId', 'vehicleId', 'assigneeId']) if (fd.has(k)) out[k] = formRef(fd, k);
	return out;
}

/** The add-a-fault-code form as the schema's input. */
export function readFaultCodeForm(fd: FormData) {
	return { code: formText(fd, 'code'), text: formText(fd, 'text') };
}
