/** Jobs on the one write path, plus the reads the technician's screens need. */
import { Op, QueryTypes } from 'sequelize';
import { jobCreate, jobPatch } from '../../schemas/job';
import { db } from '../db';
import { Customer, Job, Vehicle } from '../db/models';
import type { Actor } from '../auth/types';
import { NotFoundError } from '../errors';
import { defineAggregate } from './write-path';

const FIELDS = [
	'number',
	'customerId',
	'vehicleId',
	'complaint',
	'location',
	'assigneeId',
	'status',
	'codesBefore',
	'codesAfter',
	'notes'
] as const;

export const jobs = defineAggregate({
	entity: 'job',
	model: Job,
	createSchema: jobCreate,
	patchSchema: jobPatch,
	prepareCreate: async (actor, fields, t) => {
		if (fields.number) return fields;
		const [row] = await db().query<{ n: number | null }>(
			'SELECT MAX(number) AS n FROM jobs WHERE workshop_id = ? FOR UPDATE',
			{ replacements: [actor.workshopId], transaction: t, type: QueryTypes.SELECT }
		);
		return { ...fields, number: Number(row?.n ?? 1000) + 1 };
	},
	jobIdOf: (r) => r.id,
	toRecord: (r) => ({
		id: r.id,
		version: r.version,
		...Object.fromEntries(FIELDS.map((f) => [f, r.get(f)])),
		deleted: r.deletedAt != null,
		updatedAt: r.get('updatedAt')
	})
});

const OPEN = { [Op.notIn]: ['closed'] };
const seesAll = (a: Actor) => a.role === 'lead' || a.role === 'owner';

/** Open jobs the actor may see: assigned ones, or the whole workshop for leads and owners. */
export async function listOpen(actor: Actor) {
	const rows = await Job.findAll({
		where: {
			workshopId: actor.workshopId,
			deletedAt: { [Op.is]: null },
			status: OPEN,
			...(seesAll(actor) ? {} : { assigneeId: actor.userId })
		},
		order: [['number', 'DESC']],
		limit: 200
	});
	return withParties(
		actor,
		rows.map((r) => jobs.toRecord(r as never))
	);
}

/** One job with its customer and vehicle; 404 for another workshop or an unassigned job. */
export async function readOne(actor: Actor, id: string) {
	const job = (await jobs.read(actor, id)) as Record<string, unknown>;
	if (!seesAll(actor) && job.assigneeId !== actor.userId) throw new NotFoundError('Job');
	const [full] = await withParties(actor, [job]);
	return full;
}

async function withParties(actor: Actor, list: Record<string, unknown>[]) {
	const ids = (k: string) => [...new Set(list.map((j) => j[k]).filter(Boolean))] as string[];
	const [customers, vehicles] = await Promise.all([
		Customer.findAll({ where: { workshopId: actor.workshopId, id: ids('customerId') } }),
		Vehicle.findAll({ where: { workshopId: actor.workshopId, id: ids('vehicleId') } })
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
		customer: c.get(j.customerId as string) ?? null,
		vehicle: v.get(j.vehicleId as string) ?? null
	}));
}
