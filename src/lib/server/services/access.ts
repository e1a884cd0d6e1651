/**
 * Who may change which job, customer and vehicle (DESIGN §6), shared by the JSON API and the
 * office pages. Every check is scoped to the actor's workshop first (404 otherwise), then
 * the role (403).
 *
 * - Leads and owners see and change every job of the workshop and assign them.
 * - Technicians and apprentices see and change the jobs assigned to them; they cannot
 *   assign a job to someone else. Apprentices cannot close or reopen a job.
 * - Everyone reads the workshop's customers and vehicles; technicians, leads and owners
 *   change them; apprentices add them only for one of their own jobs and change only those
 *   on one of their own jobs.
 */
import { Op, type Transaction } from 'sequelize';
import { isLead, type Actor } from '../auth/types';
import { Job, User } from '../db/models';
import { ForbiddenError, NotFoundError, ValidationError } from '../errors';
import type { JobStatus } from '../../schemas/job';

/** Roles a job can be assigned to. */
export const ASSIGNABLE_ROLES = ['technician', 'apprentice'] as const;

/** Whether `actor` may read (and so change) a job with this assignee. */
export function mayOpenJob(actor: Actor, job: { assigneeId?: unknown }): boolean {
	return isLead(actor) || job.assigneeId === actor.userId;
}

/**
 * The live job `id` for a write by `actor`, optionally locked: 404 when it is not in the
 * workshop, 403 when it is not theirs.
 */
export async function loadJobForWrite(actor: Actor, id: string, t?: Transaction) {
	const job = await Job.findOne({
		where: { id, workshopId: actor.workshopId, deletedAt: { [Op.is]: null } },
		transaction: t,
		...(t ? { lock: t.LOCK.UPDATE } : {})
	});
	if (!job) throw new NotFoundError('Job');
	if (!mayOpenJob(actor, job))
		throw new ForbiddenError('You can change only the jobs assigned to you');
	return job;
}

/** Refuse a status change the actor's role does not allow (403). */
export function assertStatusChange(actor: Actor, from: JobStatus, to: JobStatus): void {
	if (from === to) return;
	if (from === 'closed' && !isLead(actor))
		throw new ForbiddenError('Only a workshop lead reopens a closed job');
	if (to === 'closed' && actor.role === 'apprentice')
		throw new ForbiddenError('A technician or a workshop lead closes the job');
}

/**
 * Refuse an assignee the actor may not set: 403 when a technician or apprentice names
 * someone else; 400 when it is not an active technician or apprentice of the workshop.
 * `current` is the job's assignee (undefined for a new job); keeping it is always allowed.
 */
export async function assertAssignee(
	actor: Actor,
	assigneeId: string | null,
	current?: string | null
): Promise<void> {
	if (current !== undefined && assigneeId === current) return;
	if (!isLead(actor) && assigneeId !== actor.userId)
		throw new ForbiddenError('Only a workshop lead assigns a job to someone else');
	if (assigneeId === null) return;
	const user = await User.findOne({
		where: {
			id: assigneeId,
			workshopId: actor.workshopId,
			active: true,
			role: [...ASSIGNABLE_ROLES]
		}
	});
	if (!user)
		throw new ValidationError({
			assigneeId: 'Choose a technician or apprentice of this workshop'
		});
}

/** 403 unless `actor` may change the customer or vehicle `id` (apprentices: only on their own jobs). */
export async function assertMayEditParty(
	actor: Actor,
	kind: 'customer' | 'vehicle',
	id: string,
	t?: Transaction
): Promise<void> {
	if (actor.role !== 'apprentice') return;
	const n = await Job.count({
		where: {
			workshopId: actor.workshopId,
			assigneeId: actor.userId,
			deletedAt: { [Op.is]: null },
			[kind === 'customer' ? 'customerId' : 'vehicleId']: id
		},
		transaction: t
	});
	if (n === 0) throw new ForbiddenError(`Apprentices change only the ${kind}s of their own jobs`);
}

/** 403 for an apprentice adding a customer or vehicle without naming one of their jobs. */
export function assertMayAddParty(actor: Actor, kind: 'customer' | 'vehicle', jobId: unknown) {
	if (actor.role === 'apprentice' && !jobId)
		throw new ForbiddenError(
			`Apprentices add a ${kind} only for one of their own jobs: start from the job`
		);
}
