/**
 * What a reassigned job sends down the change feed (DESIGN §5, scope): an `evict` for the
 * old assignee, and for the new one a copy of the job and everything under it — customer,
 * vehicle, tests and the append-only records — as rows with an `audience`, so the new
 * assignee's next pull carries them even though they were written long before its cursor.
 * Runs inside the write that changed the assignee (the jobs aggregate's `afterWrite`).
 */
import { QueryTypes, type Transaction } from 'sequelize';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { APPEND_TABLES, appendRecord } from '../db/append-tables';
import { appendChange } from '../db/feed';
import { Customer, Job, Test, Vehicle } from '../db/models';
import { customerRecord, jobRecord, testRecord, vehicleRecord } from '../db/records';

/** After a job's assignee changed: evict it from the old one, send it all to the new one. */
export async function feedReassignedJob(
	actor: Actor,
	jobId: string,
	from: string | null,
	to: string | null,
	t: Transaction
) {
	const job = await Job.findByPk(jobId, { transaction: t });
	if (!job) return;
	if (from) {
		await appendChange(t, actor.workshopId, {
			entity: 'job',
			entityId: jobId,
			version: job.version,
			op: 'evict',
			jobId,
			audience: from,
			record: null
		});
	}
	if (!to) return;
	const send = (entity: string, id: string, version: number, record: Record<string, unknown>) =>
		appendChange(t, actor.workshopId, { entity, entityId: id, version, op: 'upsert', jobId, audience: to, record });
	if (job.customerId) {
		const c = await Customer.findByPk(job.customerId, { transaction: t });
		if (c) await send('customer', c.id, c.version, customerRecord(c as never));
	}
	if (job.vehicleId) {
		const v = await Vehicle.findByPk(job.vehicleId, { transaction: t });
		if (v) await send('vehicle', v.id, v.version, vehicleRecord(v as never));
	}
	await send('job', job.id, job.version, jobRecord(job as never));
	for (const x of await Test.findAll({ where: { jobId }, transaction: t }))
		await send('test', x.id, x.version, testRecord(x as never));
	for (const [entity, table] of Object.entries(APPEND_TABLES)) {
		const rows = await db().query<Record<string, unknown>>(
			`SELECT * FROM ${table} WHERE job_id = ? ORDER BY seq`,
			{ replacements: [jobId], type: QueryTypes.SELECT, transaction: t }
		);
		for (const r of rows) await send(entity, r.id as string, 1, appendRecord(entity, r));
	}
}
