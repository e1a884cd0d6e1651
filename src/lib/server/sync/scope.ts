/**
 * Who sees what in the pull (DESIGN §5): technicians and apprentices get their assigned
 * jobs with everything under them (customer, vehicle, tests, readings, spark and swap
 * tests, sign-offs) plus the approved spec library; leads and owners get the workshop.
 * Reassigning a job sends `evict` to the old assignee and the job's records again to the
 * new one (rows with an `audience`).
 */
import { QueryTypes, type Transaction } from 'sequelize';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { appendChange } from '../db/feed';
import { Customer, Job, Test, Vehicle } from '../db/models';
import type { SessionUser } from '../auth/types';
import { APPEND_TABLES } from './append-tables';
import { appendRecord } from './records';

export type FeedRow = { seq: number; entity: string; entityId: string; version: number; op: 'upsert' | 'delete' | 'evict'; jobId: string | null; audience: string | null; record: Record<string, unknown> | null };


/** The ids a technician's pull is scoped to. */
export async function scopeOf(user: SessionUser) {
	const jobs = await db().query<{ id: string; customer_id: string | null; vehicle_id: string | null }>(
		'SELECT id, customer_id, vehicle_id FROM jobs WHERE workshop_id = ? AND assignee_id = ? AND deleted_at IS NULL',
		{ replacements: [user.workshopId, user.id], type: QueryTypes.SELECT }
	);
	return {
		jobs: new Set(jobs.map((j) => j.id)),
		customers: new Set(jobs.flatMap((j) => (j.customer_id ? [j.customer_id] : []))),
		vehicles: new Set(jobs.flatMap((j) => (j.vehicle_id ? [j.vehicle_id] : [])))
	};
}

/** Whether a feed row reaches this user. */
export function visible(row: FeedRow, user: SessionUser, scope: Awaited<ReturnType<typeof scopeOf>> | null): boolean {
	if (row.audience) return row.audience === user.id;
	if (!scope) return true;
	if (row.entity === 'component') return true;
	if (row.entity === 'sheet') return row.record?.state === 'approved';
	if (row.entity === 'customer') return scope.customers.has(row.entityId);
	if (row.entity === 'vehicle') return scope.vehicles.has(row.entityId);
	return row.jobId != null && scope.jobs.has(row.jobId);
}

/** After a job's assignee changed: evict it from the old one, send it all to the new one. */
export async function onJobReassigned(actor: Actor, jobId: string, from: string | null, to: string | null, t: Transaction) {
	const job = await Job.findByPk(jobId, { transaction: t });
	if (!job) return;
	if (from) {
		await appendChange(t, actor.workshopId, { entity: 'job', entityId: jobId, version: job.version, op: 'evict', jobId, audience: from, record: null });
	}
	if (!to) return;
	const { jobs } = await import('../services/jobs');
	const { tests } = await import('../services/tests');
	const customers = await import('../services/customers');
	const { vehicles } = await import('../services/vehicles');
	const send = (entity: string, id: string, version: number, record: Record<string, unknown>) =>
		appendChange(t, actor.workshopId, { entity, entityId: id, version, op: 'upsert', jobId, audience: to, record });
	if (job.customerId) {
		const c = await Customer.findByPk(job.customerId, { transaction: t });
		if (c) await send('customer', c.id, c.version, customers.toRecord(c as never));
	}
	if (job.vehicleId) {
		const v = await Vehicle.findByPk(job.vehicleId, { transaction: t });
		if (v) await send('vehicle', v.id, v.version, vehicles.toRecord(v as never));
	}
	await send('job', job.id, job.version, jobs.toRecord(job as never));
	for (const x of await Test.findAll({ where: { jobId }, transaction: t })) await send('test', x.id, x.version, tests.toRecord(x as never));
	for (const [entity, table] of Object.entries(APPEND_TABLES)) {
		const rows = await db().query<Record<string, unknown>>(`SELECT * FROM ${table} WHERE job_id = ? ORDER BY seq`, {
			replacements: [jobId],
			type: QueryTypes.SELECT,
			transaction: t
		});
		for (const r of rows) await send(entity, r.id as string, 1, appendRecord(entity, r));
	}
}

