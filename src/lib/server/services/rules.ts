/**
 * The rulebook (DESIGN §6): who may create, change, delete and see each record, written once
 * per aggregate and run by the one write path (`defineAggregate`) for every channel — form
 * actions, JSON routes and sync ops alike — and, for the append-only records of sync, by
 * `refuseAppend`. The role rules themselves are the pure functions of `src/lib/rules.ts`,
 * which the phone calls too.
 *
 * Each rule throws: `ForbiddenError` (403; sync answers `rejected: forbidden` with the same
 * words), `NotFoundError` (404: a record the actor may not see is not there for them) or
 * `ValidationError` (400: a field names something that does not exist or does not fit).
 * Another workshop's records never reach a rule: the write path finds rows only in the
 * actor's workshop.
 */
import { Op, type Transaction } from 'sequelize';
import { isLead } from '../../roles';
import {
	needsJobFacts,
	refuseAssignee,
	refuseHybridWork,
	refuseSignOff,
	refuseStatusChange,
	refuseStatusFacts,
	seesJob
} from '../../rules';
import { findIdentityProblems } from '../../schemas/vehicle';
import type { Actor } from '../auth/types';
import { Component, Customer, Job, SpecSheet, Test, User, Vehicle } from '../db/models';
import { ForbiddenError, NotFoundError, SheetApprovedError, ValidationError } from '../errors';
import type { RuleContext, Rules } from './write-path';
import type { SignOffDecision, SignOffKind } from '../../tests/signoff';
import { positionsOf } from '../../tests/facts';
import { loadJobFacts } from './job-facts';

export { seesJob };

/** Roles a job can be assigned to. */
export const ASSIGNABLE_ROLES = ['technician', 'apprentice'] as const;

function refuse(why: string | null): void {
	if (why) throw new ForbiddenError(why);
}
function leadsOnly(actor: Actor, why: string): void {
	if (!isLead(actor)) throw new ForbiddenError(why);
}

/** A live job of the actor's workshop with its vehicle's hybrid flag, or null. */
export async function jobWithVehicle(actor: Actor, jobId: unknown, t?: Transaction) {
	if (typeof jobId !== 'string') return null;
	const job = await Job.findOne({
		where: { id: jobId, workshopId: actor.workshopId, deletedAt: { [Op.is]: null } },
		transaction: t
	});
	if (!job) return null;
	const vehicle = job.vehicleId
		? await Vehicle.findOne({ where: { id: job.vehicleId, workshopId: actor.workshopId }, transaction: t })
		: null;
	return { job, hybrid: Boolean(vehicle?.hybrid) };
}

/** The live job `jobId` that the actor sees, with its hybrid flag: 404 otherwise. */
export async function seenJob(actor: Actor, jobId: unknown, t?: Transaction) {
	const found = await jobWithVehicle(actor, jobId, t);
	if (!found || !seesJob(actor, found.job)) throw new NotFoundError('Job');
	return found;
}

/** Whether the apprentice has a live job of theirs with this customer or vehicle on it. */
async function onOwnJob(actor: Actor, kind: 'customerId' | 'vehicleId', id: unknown, t: Transaction) {
	const n = await Job.count({
		where: {
			workshopId: actor.workshopId,
			assigneeId: actor.userId,
			deletedAt: { [Op.is]: null },
			[kind]: id as string
		},
		transaction: t
	});
	return n > 0;
}

async function assertLive(
	model: typeof Customer | typeof Vehicle,
	actor: Actor,
	id: unknown,
	field: string,
	message: string,
	t: Transaction
) {
	if (!id) return;
	const n = await (model as typeof Customer).count({
		where: { id: id as string, workshopId: actor.workshopId, deletedAt: { [Op.is]: null } },
		transaction: t
	});
	if (!n) throw new ValidationError({ [field]: message });
}

/**
 * Jobs. Technicians and apprentices open jobs for themselves and change only the jobs
 * assigned to them; only a workshop lead or owner assigns a job to someone else or removes
 * one; apprentices never close a job; only a lead or owner reopens a closed one. What the
 * work must show: "Re-tested OK" needs a finished re-test after the repair that reads
 * nothing out of spec; "Closed" needs no open clash on the job and every apprentice test
 * signed off (`refuseRetestedOk`, `refuseClose`, read from the stored tests in the write's
 * transaction).
 */
export const jobRules: Rules = {
	async authorize({ actor, kind, row, changed, t }) {
		if (kind === 'create') {
			if ('assigneeId' in changed) refuse(refuseAssignee(actor, (changed.assigneeId as string) ?? null));
			const status = (changed.status as string | undefined) ?? 'open';
			refuse(refuseStatusChange(actor, 'open', status));
			// A new job has no tests nor clashes yet.
			if (needsJobFacts(status)) refuse(refuseStatusFacts(status, { tests: [], openClashes: 0 }));
			return;
		}
		if (!seesJob(actor, row!)) throw new ForbiddenError('You can change only the jobs assigned to you');
		if (kind === 'delete') return leadsOnly(actor, 'Only a workshop lead can remove a job');
		if ('assigneeId' in changed) refuse(refuseAssignee(actor, (changed.assigneeId as string) ?? null));
		if ('status' in changed) {
			refuse(refuseStatusChange(actor, row!.status as string, changed.status as string));
			if (needsJobFacts(changed.status))
				refuse(refuseStatusFacts(changed.status as string, await loadJobFacts(actor, row!.id as string, t)));
		}
	},
	async checkFields({ actor, changed, t }) {
		const fields: Record<string, string> = {};
		const live = async (model: typeof Customer | typeof Vehicle, field: string, message: string) => {
			try {
				await assertLive(model, actor, changed[field], field, message, t);
			} catch (e) {
				if (!(e instanceof ValidationError)) throw e;
				Object.assign(fields, e.fields);
			}
		};
		await live(Customer, 'customerId', 'No such customer in this workshop');
		await live(Vehicle, 'vehicleId', 'No such vehicle in this workshop');
		if (changed.assigneeId) {
			const user = await User.findOne({
				where: {
					id: changed.assigneeId as string,
					workshopId: actor.workshopId,
					active: true,
					role: [...ASSIGNABLE_ROLES]
				},
				transaction: t
			});
			if (!user) fields.assigneeId = 'Choose a technician or apprentice of this workshop';
		}
		if (Object.keys(fields).length) throw new ValidationError(fields);
	}
};

/**
 * Customers and vehicles: everyone in the workshop adds and changes them, except
 * apprentices, who add one only for a job of theirs and change only those on their jobs;
 * only a workshop lead or owner removes one.
 */
function partyRules(kind: 'customer' | 'vehicle'): Rules['authorize'] {
	const ref = kind === 'customer' ? 'customerId' : 'vehicleId';
	return async ({ actor, kind: write, row, t, via }) => {
		if (write === 'delete') return leadsOnly(actor, `Only a workshop lead can remove a ${kind}`);
		if (actor.role !== 'apprentice') return;
		if (write === 'create') {
			const job = via?.jobId ? await jobWithVehicle(actor, via.jobId, t) : null;
			if (!job || job.job.assigneeId !== actor.userId)
				throw new ForbiddenError(
					`Apprentices add a ${kind} only for one of their own jobs: start from the job`
				);
			return;
		}
		if (!(await onOwnJob(actor, ref, row!.id, t)))
			throw new ForbiddenError(`Apprentices change only the ${kind}s of their own jobs`);
	};
}

export const customerRules: Rules = { authorize: partyRules('customer') };

export const vehicleRules: Rules = {
	authorize: partyRules('vehicle'),
	async checkFields({ actor, kind, row, changed, t }) {
		await assertLive(Customer, actor, changed.customerId, 'customerId', 'No such customer in this workshop', t);
		if (kind === 'update') {
			const problems = findIdentityProblems({ ...row, ...changed } as never);
			if (Object.keys(problems).length) throw new ValidationError(problems);
		}
	}
};

/**
 * A re-test names the first test of the same part and positions on the same job (400 naming
 * `retestOf` otherwise): checked when it starts, and again when its part or positions change.
 */
async function checkRetestLink(actor: Actor, f: Record<string, unknown>, t: Transaction) {
	const first = await Test.findOne({
		where: { id: f.retestOf as string, workshopId: actor.workshopId, deletedAt: { [Op.is]: null } },
		transaction: t
	});
	const bad = (why: string) => new ValidationError({ retestOf: why });
	if (!first || first.jobId !== f.jobId) throw bad('Re-test a test of the same job');
	if (first.retestOf) throw bad('Link the re-test to the first test, not to another re-test');
	const same =
		first.componentId && f.componentId
			? first.componentId === f.componentId
			: (first.partNumber ?? '').toLowerCase() === String(f.partNumber ?? '').toLowerCase();
	if (!same) throw bad('A re-test is of the same part as its first test');
	const before = positionsOf(first.position);
	const now = positionsOf(f.position);
	if (before.length !== 0 && (now.length === 0 || now.some((p) => !before.includes(p))))
		throw bad(`A re-test covers the positions of its first test (${before.join(', ')})`);
}

/**
 * Tests: on a job the actor sees (404 otherwise); never an airbag component; no apprentice
 * on a hybrid or electric vehicle; a test is changed or removed by its technician or a lead;
 * a re-test is linked to the first test of the same part and positions.
 */
export const testRules: Rules = {
	async authorize({ actor, kind, row, changed, t }) {
		const { hybrid } = await seenJob(actor, row ? row.jobId : changed.jobId, t);
		refuse(refuseHybridWork(actor, hybrid));
		if (row && !isLead(actor) && row.technicianId && row.technicianId !== actor.userId)
			throw new ForbiddenError('This test belongs to someone else');
		if (kind !== 'delete' && changed.componentId) {
			const c = await Component.findOne({
				where: { id: changed.componentId as string, workshopId: actor.workshopId },
				transaction: t
			});
			if (((c?.cautions as string[] | null) ?? []).includes('airbag'))
				throw new ForbiddenError('Airbag components are never tested with an ohmmeter');
		}
	},
	async checkFields({ actor, kind, row, changed, t }) {
		if (kind === 'delete') return;
		const f = { ...row, ...changed };
		const relinks = kind === 'create' || ['componentId', 'partNumber', 'position'].some((k) => k in changed);
		if (f.retestOf && relinks) await checkRetestLink(actor, f, t);
		const touches = ['componentId', 'sheetId', 'sheetVersion'].some((k) => k in changed);
		if (kind === 'update' && !touches) return;
		if (f.componentId && 'componentId' in changed) {
			const n = await Component.count({
				where: { id: f.componentId as string, workshopId: actor.workshopId },
				transaction: t
			});
			if (!n) throw new ValidationError({ componentId: 'No such component in the library' });
		}
		if (!f.sheetId) return;
		const s = await SpecSheet.findOne({
			where: { id: f.sheetId as string, workshopId: actor.workshopId },
			transaction: t
		});
		if (!s || s.state !== 'approved')
			throw new ValidationError({ sheetId: 'Only an approved spec sheet can be used' });
		if (f.componentId && s.componentId !== f.componentId)
			throw new ValidationError({ sheetId: 'This sheet belongs to another component' });
		if (changed.sheetVersion != null && changed.sheetVersion !== s.sheetVersion)
			throw new ValidationError({ sheetVersion: 'The version does not match the sheet' });
	}
};

/** 400 naming `partNumber` when another component of the workshop has it (any letter case). */
async function assertPartNumberFree(actor: Actor, partNumber: string, id: string | null, t: Transaction) {
	const other = await Component.findOne({
		where: { workshopId: actor.workshopId, partNumber },
		transaction: t
	});
	if (other && other.id !== id)
		throw new ValidationError({
			partNumber: other.deletedAt
				? `A removed component had ${other.partNumber}; use another part number`
				: `${other.partNumber} is already in the library`
		});
}

/**
 * Components of the spec library: anyone adds and changes them; only a workshop lead or
 * owner removes a caution or a component.
 */
export const componentRules: Rules = {
	authorize({ actor, kind, row, changed }) {
		if (kind === 'delete') return leadsOnly(actor, 'Only a workshop lead can remove a component');
		if (kind !== 'update' || !changed.cautions) return;
		const before = (row!.cautions as string[] | null) ?? [];
		const after = changed.cautions as string[];
		if (before.some((c) => !after.includes(c)))
			leadsOnly(actor, 'Only a workshop lead or owner removes a caution');
	},
	async checkFields({ actor, kind, row, changed, t }) {
		if (typeof changed.partNumber === 'string')
			await assertPartNumberFree(actor, changed.partNumber, kind === 'create' ? null : (row!.id as string), t);
	}
};

/** The fields that approve a sheet: only a lead or owner sets them (through the approval). */
const APPROVAL = ['state', 'approvedBy', 'approvedAt'];

/**
 * Spec sheets: drafts by anyone; an approved version never changes nor goes; approval by a
 * workshop lead or owner; a draft is discarded by its author or a lead.
 */
export const sheetRules: Rules = {
	authorize({ actor, kind, row, changed, current }) {
		const approving = APPROVAL.some((k) => k in changed) && changed.state !== 'draft';
		if (approving) leadsOnly(actor, 'Only a workshop lead or owner approves a sheet');
		if (kind === 'create') return;
		if (row!.state === 'approved') throw new SheetApprovedError(current());
		if (kind === 'delete' && !isLead(actor) && row!.createdBy !== actor.userId)
			throw new ForbiddenError('Only its author or a workshop lead discards a draft');
	}
};

/** Why an append-only record may not be stored, or null. */
export type AppendRefusal = { reason: 'not_found' | 'forbidden'; message?: string };

/**
 * The append-only records (readings, spark and swap tests, sign-offs; photos are not taken
 * yet), from sync and from the desk: on a job the actor sees (`not_found` otherwise, as for
 * a record of another workshop); sign-offs by a workshop lead or owner, only of a test an
 * apprentice did, never signed twice (`signing`: the test's facts and the decision); no
 * apprentice work on a hybrid or electric vehicle. `job` is the record's job as the push
 * loaded it, in bulk.
 */
export function refuseAppend(
	actor: Actor,
	entity: string,
	job: { assigneeId: string | null; hybrid: boolean } | undefined,
	signing?: { needsSignOff: boolean; signOff: SignOffKind; decision: SignOffDecision }
): AppendRefusal | null {
	if (!job || !seesJob(actor, job)) return { reason: 'not_found' };
	const why =
		entity === 'signoff'
			? refuseSignOff(actor, signing, signing?.decision)
			: refuseHybridWork(actor, job.hybrid);
	return why ? { reason: 'forbidden', message: why } : null;
}

/**
 * Quotes. Whoever may work on the job makes its quote (a technician on their own job, a lead
 * on any) and changes what is on it while the customer has not answered; a verbal answer is
 * recorded once, with the customer's name; only a lead removes a quote the customer answered.
 */
export const quoteRules: Rules = {
	async authorize({ actor, kind, row, changed, t }) {
		const { job } = await seenJob(actor, row ? row.jobId : changed.jobId, t);
		if (kind === 'create' && job.status === 'closed') throw new ForbiddenError('The job is closed');
		if (!row) return;
		const answered = ['approved', 'declined'].includes(row.state as string);
		if (kind === 'delete') {
			if (answered) leadsOnly(actor, 'Only a workshop lead can remove a quote the customer answered');
			return;
		}
		if ('request' in changed && (answered || row.state === 'replaced'))
			throw new ForbiddenError('The customer has answered this quote; make a new one');
		if ('verbalDecision' in changed && (answered || row.state === 'replaced' || row.verbalDecision))
			throw new ForbiddenError('The customer has already answered this quote');
	},
	async checkFields({ kind, row, changed }) {
		if (kind === 'delete') return;
		const f = { ...row, ...changed };
		if (changed.verbalDecision && !(typeof f.verbalName === 'string' && f.verbalName.trim()))
			throw new ValidationError({ verbalName: 'Type the name of the customer who answered' });
	}
};

/**
 * The workshop's settings (what phones keep, the time zone): a workshop lead or owner changes
 * them, for their own workshop only (the actor's workshop is the one changed).
 */
export function refuseWorkshopSettings(actor: Actor): void {
	leadsOnly(actor, 'Only a workshop lead or owner can change the workshop’s settings');
}

/**
 * Refunds. Only a workshop lead or owner refunds, only a payment that was paid, and never
 * more than what is left unrefunded (several partial refunds may add up to the whole);
 * the amount is a whole number of minor units above zero. `leftMinor` is worked out by the
 * payments service under a lock on the payment.
 */
export function refuseRefund(
	actor: Actor,
	payment: { state: string; leftMinor: number },
	amountMinor: number,
	leftText: string
): void {
	leadsOnly(actor, 'Only a workshop lead or owner can refund a payment');
	if (payment.state !== 'paid') throw new ForbiddenError('Only a paid payment can be refunded');
	if (payment.leftMinor <= 0) throw new ForbiddenError('This payment has been refunded in full');
	if (!Number.isSafeInteger(amountMinor) || amountMinor < 1)
		throw new ValidationError({ amount: 'Type an amount above zero' });
	if (amountMinor > payment.leftMinor)
		throw new ValidationError({ amount: `At most ${leftText}: that is what is left to refund` });
}
