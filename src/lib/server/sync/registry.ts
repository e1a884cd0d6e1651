/**
 * What each mutable entity of the protocol maps to on the server: its aggregate (the one
 * write path) and who may write it. Append-only entities live in `append.ts`.
 */
import type { Transaction } from 'sequelize';
import { isLead, type Actor } from '../auth/types';
import { Job } from '../db/models';
import { components, sheets } from '../services/components';
import * as customers from '../services/customers';
import { jobs } from '../services/jobs';
import { jobForActor, tests } from '../services/tests';
import { vehicles } from '../services/vehicles';
import type { Op } from '../../sync/protocol';

export const AGGREGATES = {
	customer: customers,
	vehicle: vehicles,
	job: jobs,
	test: tests,
	component: components,
	sheet: sheets
} as const;
export type MutableEntity = keyof typeof AGGREGATES;


/**
 * Whether `actor` may apply `op` to a record (`row` is the stored one, or null for a new
 * one). Returns a reason to refuse, or null. Workshop scoping is checked before this.
 */
export async function refuseMutable(
	actor: Actor,
	op: Op,
	row: Record<string, unknown> | null,
	fields: Record<string, unknown>,
	t: Transaction
): Promise<string | null> {
	const entity = op.entity as MutableEntity;
	// A draft sheet may also be discarded by its author, as through the JSON API.
	const ownDraft = entity === 'sheet' && row?.state === 'draft' && row?.createdBy === actor.userId;
	if (op.kind === 'delete' && !isLead(actor) && entity !== 'test' && !ownDraft) return 'Only a lead deletes this';
	switch (entity) {
		case 'job': {
			if (actor.role !== 'apprentice') return null;
			const assignee = row ? row.assigneeId : fields.assigneeId;
			if (assignee !== actor.userId) return 'Apprentices edit only their own jobs';
			if ('assigneeId' in fields && fields.assigneeId !== actor.userId) return 'Apprentices cannot reassign jobs';
			return null;
		}
		case 'test': {
			const jobId = (row?.jobId ?? fields.jobId) as string;
			await jobForActor(actor, jobId, t); // 404 when not theirs
			if (row && !isLead(actor) && row.technicianId && row.technicianId !== actor.userId) {
				return 'This test belongs to someone else';
			}
			return null;
		}
		case 'sheet':
			if (row && row.state === 'approved') return 'An approved sheet never changes; start a new draft';
			return null;
		case 'customer':
		case 'vehicle':
			if (actor.role !== 'apprentice' || !row) return null;
			return (await Job.count({
				where: { workshopId: actor.workshopId, assigneeId: actor.userId, [`${entity}Id`]: op.entityId },
				transaction: t
			}))
				? null
				: 'Apprentices edit only the customers and vehicles of their own jobs';
		default:
			return null;
	}
}
