/**
 * Jobs on the one write path, with the rulebook's job rules (`jobRules` in `rules.ts`), the
 * server-side list, the status history (read from the audit rows of the `status` field) and
 * the fault codes. The job number is the server's: the next one of the workshop, whatever
 * the channel; a phone learns it through pull.
 */
import { Op, QueryTypes, type Transaction } from 'sequelize';
import {
	CODE_LISTS,
	faultCode,
	JOB_STATUSES,
	jobListQuery,
	jobStatusChange,
	jobCreate,
	jobPatch,
	type CodeList,
	type JobListQuery,
	type JobStatus
} from '../../schemas/job';
import type { ListPage } from '../../schemas/common';
import { db } from '../db';
import { AuditEntry, Customer, Job, User, Vehicle, type FaultCode } from '../db/models';
import { jobRecord } from '../db/records';
import type { Actor } from '../auth/types';
import { NotFoundError, StaleVersionError, ValidationError } from '../errors';
import { isLead } from '../../roles';
import { feedReassignedJob } from './job-feed';
import { inOrder, likeOf, orderBy, pageOfIds, Where } from './list-sql';
import { ASSIGNABLE_ROLES, jobRules, seesJob } from './rules';
import { defineAggregate } from './write-path';

export const jobs = defineAggregate({
	entity: 'job',
	model: Job,
	createSchema: jobCreate,
	patchSchema: jobPatch,
	rules: jobRules,
	serverOwned: ['number'],
	/**
	 * The server's part of a new job: its number (the next of the workshop, unless the server
	 * itself gave one), the one who opened it as assignee when a technician or apprentice
	 * named no one, and the vehicle's owner as customer when none is given.
	 */
	prepareCreate: async (actor, fields, t) => {
		const out = { ...fields };
		if (!isLead(actor) && !('assigneeId' in out)) out.assigneeId = actor.userId;
		if (out.vehicleId && !out.customerId) {
			const v = await Vehicle.findOne({
				where: { id: out.vehicleId, workshopId: actor.workshopId },
				transaction: t
			});
			out.customerId = v?.customerId ?? null;
		}
		if (out.number) return out;
		const [row] = await db().query<{ n: number | null }>(
			'SELECT MAX(number) AS n FROM jobs WHERE workshop_id = ? FOR UPDATE',
			{ replacements: [actor.workshopId], transaction: t, type: QueryTypes.SELECT }
		);
		return { ...out, number: Number(row?.n ?? 1000) + 1 };
	},
	jobIdOf: (r) => r.id,
	afterWrite: async (actor, row, action, changed, t) => {
		const moved = changed.find((c) => c.field === 'assigneeId');
		if (action !== 'update' || !moved || moved.old === moved.new) return;
		await feedReassignedJob(
			actor,
			row.id,
			(moved.old as string | null) ?? null,
			(moved.new as string | null) ?? null,
			t
		);
	},
	toRecord: jobRecord
});

/** A job as the API and the change feed send it. */
export type JobRecord = {
	id: string;
	version: number;
	number: number;
	customerId: string | null;
	vehicleId: string | null;
	complaint: string;
	location: string | null;
	assigneeId: string | null;
	status: JobStatus;
	codesBefore: FaultCode[] | null;
	codesAfter: FaultCode[] | null;
	notes: string | null;
	deleted: boolean;
	createdAt: Date;
	updatedAt: Date;
};

function parse<T>(schema: { safeParse: (v: unknown) => { success: boolean } }, input: unknown): T {
	const r = schema.safeParse(input) as
		{ success: true; data: T } | { success: false; error: never };
	if (!r.success) throw ValidationError.fromZod(r.error);
	return r.data;
}

/**
 * Open a job. Technicians and apprentices open jobs assigned to themselves; leads and
 * owners may assign any technician or apprentice (or no one). The number comes from the
 * server; without a customer, the vehicle's owner is the job's customer.
 */
export async function addJob(actor: Actor, input: unknown) {
	return jobs.create(actor, input);
}

/** Change a job the actor saw at `baseVersion`: 404 → 403 → 400 → 409. */
export async function editJob(actor: Actor, id: string, baseVersion: number, input: unknown) {
	return jobs.update(actor, id, baseVersion, input);
}

/** `{ status, baseVersion }`: move the job to another status (recorded with who and when). */
export async function changeStatus(actor: Actor, id: string, input: unknown) {
	const { status, baseVersion } = parse<{ status: JobStatus; baseVersion: number }>(
		jobStatusChange,
		input
	);
	return editJob(actor, id, baseVersion, { status });
}

/**
 * Change one list of fault codes against the latest version of the job (adding or removing
 * one code clashes with nothing, so a concurrent edit is retried once rather than refused).
 */
async function changeCodes(
	actor: Actor,
	id: string,
	list: CodeList,
	change: (codes: FaultCode[]) => FaultCode[]
) {
	const field = CODE_LISTS[list];
	for (let attempt = 0; ; attempt++) {
		const job = await Job.findOne({
			where: { id, workshopId: actor.workshopId, deletedAt: { [Op.is]: null } }
		});
		if (!job) throw new NotFoundError('Job');
		const codes = (job.get(field) as FaultCode[] | null) ?? [];
		try {
			return await jobs.update(actor, id, job.version, { [field]: change(codes) });
		} catch (e) {
			if (!(e instanceof StaleVersionError) || attempt > 0) throw e;
		}
	}
}

/** Add a fault code `{ code, text }` to the codes read before or after the work. */
export async function addFaultCode(actor: Actor, id: string, list: CodeList, input: unknown) {
	const code = parse<FaultCode>(faultCode, input);
	return changeCodes(actor, id, list, (codes) => {
		if (codes.some((c) => c.code === code.code && c.text === code.text)) return codes;
		if (codes.length >= 50) throw new ValidationError({ code: 'At most 50 codes' });
		return [...codes, code];
	});
}

/** Remove the fault code at `index` of a list, if it still holds `code` there (or elsewhere). */
export async function removeFaultCode(
	actor: Actor,
	id: string,
	list: CodeList,
	index: number,
	code: string
) {
	return changeCodes(actor, id, list, (codes) => {
		const at = codes[index]?.code === code ? index : codes.findIndex((c) => c.code === code);
		return at < 0 ? codes : codes.filter((_, i) => i !== at);
	});
}

/**
 * The job a new customer or vehicle is added for, locked (400 naming `jobId` when it is not
 * a live job of the workshop); the rules of the write that follows decide whether the actor
 * may put it there.
 */
export async function jobForAttach(actor: Actor, jobId: string, t: Transaction) {
	const job = await Job.findOne({
		where: { id: jobId, workshopId: actor.workshopId, deletedAt: { [Op.is]: null } },
		transaction: t,
		lock: t.LOCK.UPDATE
	});
	if (!job) throw new ValidationError({ jobId: 'No such job' });
	return job;
}

/** Put a customer or vehicle on a locked job, inside the caller's transaction. */
export async function attachToJob(
	actor: Actor,
	job: Job,
	patch: { customerId?: string; vehicleId?: string },
	t: Transaction
) {
	return jobs.update(actor, job.id, job.version, patch, { transaction: t });
}

/** Open jobs the actor may see: assigned ones, or the whole workshop for leads and owners. */
export async function listOpen(actor: Actor) {
	return (await searchJobs(actor, { pageSize: 100 })).items;
}

/** One job with its customer, vehicle and assignee; 404 for another workshop or an unassigned job. */
export async function readOne(actor: Actor, id: string) {
	const job = (await jobs.read(actor, id)) as unknown as JobRecord;
	if (!seesJob(actor, job)) throw new NotFoundError('Job');
	const [full] = await withParties(actor, [job]);
	return full;
}

/** Parse a list query (400 naming the parameter). */
export function parseListQuery(input: unknown): JobListQuery {
	return parse<JobListQuery>(jobListQuery, input);
}

const SORT_COLUMNS = {
	number: 'j.number',
	created: 'j.created_at',
	updated: 'j.updated_at',
	status: `FIELD(j.status, ${JOB_STATUSES.map((s) => `'${s}'`).join(', ')})`,
	customer: 'c.name'
};
const FROM = `jobs j
	LEFT JOIN customers c ON c.id = j.customer_id AND c.workshop_id = j.workshop_id
	LEFT JOIN vehicles v ON v.id = j.vehicle_id AND v.workshop_id = j.workshop_id`;

const nextDay = (day: string) =>
	new Date(Date.parse(`${day}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10);

function jobFilter(actor: Actor, q: JobListQuery): Where {
	const where = new Where().and('j.workshop_id = ?', actor.workshopId).and('j.deleted_at IS NULL');
	if (!isLead(actor)) where.and('j.assignee_id = ?', actor.userId);
	if (q.status === 'active') where.and("j.status <> 'closed'");
	else if (q.status !== 'all') where.and('j.status = ?', q.status);
	if (q.assignee === 'me') where.and('j.assignee_id = ?', actor.userId);
	else if (q.assignee === 'none') where.and('j.assignee_id IS NULL');
	else if (q.assignee !== 'any') where.and('j.assignee_id = ?', q.assignee);
	if (q.vehicle) where.and('j.vehicle_id = ?', q.vehicle);
	if (q.customer) where.and('j.customer_id = ?', q.customer);
	if (q.from) where.and('j.created_at >= ?', `${q.from} 00:00:00`);
	if (q.to) where.and('j.created_at < ?', `${nextDay(q.to)} 00:00:00`);
	if (q.q) {
		const like = likeOf(q.q);
		const number = /^(?:job\s*)?#?(\d{1,9})$/i.exec(q.q)?.[1];
		where.and(
			`(j.number = ? OR j.complaint LIKE ? OR j.location LIKE ? OR j.notes LIKE ? OR c.name LIKE ?
			  OR REPLACE(v.plate, ' ', '') LIKE ? OR v.vin LIKE ? OR CONCAT_WS(' ', v.make, v.model) LIKE ?)`,
			number ? Number(number) : -1,
			like,
			like,
			like,
			like,
			likeOf(q.q.replace(/\s/g, '')),
			like,
			like
		);
	}
	return where;
}

/**
 * One page of the jobs the actor may see, matching the query (see `jobListQuery`); `q`
 * matches the number, complaint, location, notes, customer name, plate, VIN, make and model.
 */
export async function searchJobs(actor: Actor, input: unknown): Promise<ListPage<JobRecord>> {
	const q = parseListQuery(input);
	const { ids, total } = await pageOfIds(
		'j.id',
		FROM,
		jobFilter(actor, q),
		orderBy(q.sort, SORT_COLUMNS, 'j.number'),
		q.page,
		q.pageSize
	);
	const rows = ids.length ? await Job.findAll({ where: { id: ids } }) : [];
	const items = await withParties(
		actor,
		inOrder(ids, rows).map((r) => jobs.toRecord(r as never) as unknown as JobRecord)
	);
	return { items, total, page: q.page, pageSize: q.pageSize };
}

/** The status changes of a job, newest first: status, the one before, who and when. */
export async function statusHistory(actor: Actor, id: string) {
	await readOne(actor, id);
	const rows = await AuditEntry.findAll({
		where: { workshopId: actor.workshopId, entity: 'job', entityId: id, field: 'status' },
		order: [['id', 'DESC']]
	});
	const names = await userNames(
		actor,
		rows.map((r) => r.userId)
	);
	const value = (v: string | null) => (v == null ? null : (JSON.parse(v) as JobStatus));
	return rows.map((r) => ({
		status: value(r.newValue),
		from: value(r.oldValue),
		at: r.at,
		by: r.userId ? { id: r.userId, name: names.get(r.userId) ?? 'Former user' } : null,
		deviceId: r.deviceId
	}));
}

/** Technicians and apprentices of the workshop a job can be assigned to. */
export async function listAssignable(actor: Actor) {
	const rows = await User.findAll({
		where: { workshopId: actor.workshopId, active: true, role: [...ASSIGNABLE_ROLES] },
		order: [['name', 'ASC']]
	});
	return rows.map((u) => ({ id: u.id, name: u.name, role: u.role }));
}

async function userNames(actor: Actor, ids: (string | null)[]) {
	const list = [...new Set(ids.filter((x): x is string => !!x))];
	const users = list.length
		? await User.findAll({ where: { id: list, workshopId: actor.workshopId } })
		: [];
	return new Map(users.map((u) => [u.id, u.name]));
}

async function withParties(actor: Actor, list: JobRecord[]) {
	const ids = (k: 'customerId' | 'vehicleId' | 'assigneeId') =>
		[...new Set(list.map((j) => j[k]).filter(Boolean))] as string[];
	const [customers, vehicles, names] = await Promise.all([
		Customer.findAll({ where: { workshopId: actor.workshopId, id: ids('customerId') } }),
		Vehicle.findAll({ where: { workshopId: actor.workshopId, id: ids('vehicleId') } }),
		userNames(actor, ids('assigneeId'))
	]);
	const c = new Map(customers.map((x) => [x.id, { id: x.id, name: x.name, phone: x.phone }]));
	const v = new Map(
		vehicles.map((x) => [
			x.id,
			{
				id: x.id,
				make: x.make,
				model: x.model,
				year: x.year,
				plate: x.plate,
				vin: x.vin,
				hybrid: Boolean(x.hybrid)
			}
		])
	);
	return list.map((j) => ({
		...j,
		customer: (j.customerId && c.get(j.customerId)) || null,
		vehicle: (j.vehicleId && v.get(j.vehicleId)) || null,
		assignee: j.assigneeId
			? { id: j.assigneeId, name: names.get(j.assigneeId) ?? 'Former user' }
			: null
	}));
}
