/**
 * Who sees what in the pull (DESIGN §5): technicians and apprentices get their assigned
 * jobs with everything under them (customer, vehicle, tests, readings, spark and swap
 * tests, sign-offs) plus the approved spec library; leads and owners get the workshop.
 * Rows with an `audience` (a reassigned job's `evict` and copies, written by
 * `services/job-feed.ts`) reach that user alone. A technician's scope is the jobs that
 * `seesJob` (the rulebook, `src/lib/rules.ts`) lets them see: the ones assigned to them.
 */
import { QueryTypes } from 'sequelize';
import type { SessionUser } from '../auth/types';
import { db } from '../db';

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
