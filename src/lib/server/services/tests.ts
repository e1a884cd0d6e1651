/**
 * Tests on the one write path. A test pins its snapshot: the approved sheet version, the
 * meter and the temperature. Refused: a sheet that is not approved or not the component's,
 * an airbag component (never tested with an ohmmeter), and an apprentice on a hybrid/EV.
 */
import type { Transaction } from 'sequelize';
import { testCreate, testPatch } from '../../schemas/test';
import type { Actor } from '../auth/types';
import { Component, Job, SpecSheet, Test, Vehicle } from '../db/models';
import { ForbiddenError, NotFoundError, ValidationError } from '../errors';
import { mayOpenJob } from './access';
import { defineAggregate } from './write-path';

const FIELDS = [
	'jobId',
	'componentId',
	'sheetId',
	'sheetVersion',
	'partNumber',
	'position',
	'technicianId',
	'meter',
	'temperature',
	'state',
	'notes'
] as const;

/** The job, if the actor may work on it (assigned, or a lead/owner); 404 otherwise. */
export async function jobForActor(actor: Actor, jobId: string, t?: Transaction) {
	const job = await Job.findOne({
		where: { id: jobId, workshopId: actor.workshopId },
		transaction: t
	});
	const lead = actor.role === 'lead' || actor.role === 'owner';
	if (!job || job.deletedAt || (!lead && job.assigneeId !== actor.userId))
		throw new NotFoundError('Job');
	return job;
}

async function checkNewTest(actor: Actor, f: Record<string, unknown>, t: Transaction) {
	const job = await jobForActor(actor, f.jobId as string, t);
	if (actor.role === 'apprentice' && job.vehicleId) {
		const v = await Vehicle.findByPk(job.vehicleId, { transaction: t });
		if (v?.hybrid)
			throw new ForbiddenError('Apprentices do not test on hybrid or electric vehicles');
	}
	if (f.componentId) {
		const c = await Component.findOne({
			where: { id: f.componentId, workshopId: actor.workshopId },
			transaction: t
		});
		if (!c) throw new ValidationError({ componentId: 'No such component in the library' });
		if (((c.cautions as string[] | null) ?? []).includes('airbag')) {
			throw new ForbiddenError('Airbag components are never tested with an ohmmeter');
		}
	}
	if (f.sheetId) {
		const s = await SpecSheet.findOne({
			where: { id: f.sheetId, workshopId: actor.workshopId },
			transaction: t
		});
		if (!s || s.state !== 'approved')
			throw new ValidationError({ sheetId: 'Only an approved spec sheet can be used' });
		if (f.componentId && s.componentId !== f.componentId) {
			throw new ValidationError({ sheetId: 'This sheet belongs to another component' });
		}
		if (f.sheetVersion != null && f.sheetVersion !== s.sheetVersion) {
			throw new ValidationError({ sheetVersion: 'The version does not match the sheet' });
		}
		return { ...f, sheetVersion: s.sheetVersion, technicianId: f.technicianId ?? actor.userId };
	}
	return { ...f, technicianId: f.technicianId ?? actor.userId };
}

export const tests = defineAggregate({
	entity: 'test',
	model: Test,
	createSchema: testCreate,
	patchSchema: testPatch,
	prepareCreate: checkNewTest,
	jobIdOf: (r) => r.get('jobId') as string,
	toRecord: (r) => ({
		id: r.id,
		version: r.version,
		...Object.fromEntries(FIELDS.map((f) => [f, r.get(f)])),
		deleted: r.deletedAt != null
	})
});
