/**
 * Vehicles on the one write path. The VIN is checked by the schema with `validateVin`
 * (errors refuse); a check digit that does not match comes back as a warning beside the
 * record (`warnings.vin`), never stored and never refused.
 */
import { z } from 'zod';
import type { ListPage } from '../../schemas/common';
import {
	vehicleCreate,
	vehicleListQuery,
	vehiclePatch,
	vinWarnings,
	type VehicleListQuery
} from '../../schemas/vehicle';
import type { Actor } from '../auth/types';
import { Customer, Vehicle } from '../db/models';
import { vehicleRecord } from '../db/records';
import { ValidationError } from '../errors';
import { attachToJob, jobForAttach } from './jobs';
import { vehicleRules } from './rules';
import { inOrder, likeOf, orderBy, pageOfIds, Where } from './list-sql';
import { defineAggregate, inTransaction } from './write-path';

export const vehicles = defineAggregate({
	entity: 'vehicle',
	model: Vehicle,
	createSchema: vehicleCreate,
	patchSchema: vehiclePatch,
	rules: vehicleRules,
	toRecord: vehicleRecord
});

/** A vehicle as the API and the change feed send it. */
export type VehicleRecord = {
	id: string;
	version: number;
	customerId: string | null;
	vin: string | null;
	chassisNo: string | null;
	chassisReason: string | null;
	plate: string | null;
	make: string;
	model: string;
	year: number | null;
	engineCode: string | null;
	cylinders: number | null;
	odometer: number | null;
	odometerUnit: 'km' | 'mi';
	hybrid: boolean;
	deleted: boolean;
	updatedAt: Date;
};

/** A vehicle in a list: with its owner's name and its VIN warnings. */
export type VehicleListItem = VehicleRecord & {
	customer: { id: string; name: string } | null;
	warnings: { vin?: string };
};

/** Warnings to show beside a vehicle (they never refuse it). */
export function warningsOf(v: { vin?: unknown }): { vin?: string } {
	const list = vinWarnings(typeof v.vin === 'string' ? v.vin : null);
	return list.length ? { vin: list.join(' ') } : {};
}

function parse<S extends z.ZodType>(schema: S, input: unknown): z.output<S> {
	const r = schema.safeParse(input);
	if (!r.success) throw ValidationError.fromZod(r.error);
	return r.data;
}

const jobRef = z.uuid().nullable().optional();

/**
 * Add a vehicle. With `jobId` it is put on that job in the same transaction, and takes the
 * job's customer as owner when none is given (apprentices must name one of their own jobs).
 */
export async function addVehicle(actor: Actor, input: unknown, o: { jobId?: unknown } = {}) {
	const ref = jobRef.safeParse(o.jobId || null);
	if (!ref.success) throw new ValidationError({ jobId: 'Not a valid job id' });
	const fields = parse(vehicleCreate, input);
	return inTransaction(undefined, async (t) => {
		const job = ref.data ? await jobForAttach(actor, ref.data, t) : null;
		const owner = fields.customerId ?? job?.customerId ?? null;
		const rec = (await vehicles.create(
			actor,
			{ ...(input as object), customerId: owner },
			{ transaction: t, via: { jobId: job?.id } }
		)) as unknown as VehicleRecord;
		if (job) {
			const patch = job.customerId || !owner ? {} : { customerId: owner };
			await attachToJob(actor, job, { vehicleId: rec.id, ...patch }, t);
		}
		return { vehicle: rec, warnings: warningsOf(rec) };
	});
}

/**
 * Change a vehicle the actor saw at `baseVersion`. The VIN-or-chassis rule is checked on the
 * record the patch would produce (`vehicleRules`; apprentices: only vehicles on their jobs).
 */
export async function editVehicle(actor: Actor, id: string, baseVersion: number, input: unknown) {
	const rec = (await vehicles.update(actor, id, baseVersion, input)) as unknown as VehicleRecord;
	return { vehicle: rec, warnings: warningsOf(rec) };
}

/** One vehicle with its owner and VIN warnings (404 across workshops). */
export async function readVehicle(actor: Actor, id: string) {
	const rec = (await vehicles.read(actor, id)) as unknown as VehicleRecord;
	const owner = rec.customerId
		? await Customer.findOne({
				where: { id: rec.customerId, workshopId: actor.workshopId }
			})
		: null;
	return {
		vehicle: { ...rec, customer: owner ? { id: owner.id, name: owner.name } : null },
		warnings: warningsOf(rec)
	};
}

/** Parse a list query (400 naming the parameter). */
export function parseListQuery(input: unknown): VehicleListQuery {
	return parse(vehicleListQuery, input);
}

const SORT_COLUMNS = {
	plate: 'v.plate',
	make: "CONCAT_WS(' ', v.make, v.model)",
	year: 'v.year',
	created: 'v.created_at',
	updated: 'v.updated_at'
};

/**
 * One page of the workshop's vehicles: `q` matches plate (spaces ignored), VIN, chassis
 * number, make, model, engine code and the owner's name; filters by owner and hybrid/EV.
 */
export async function searchVehicles(
	actor: Actor,
	input: unknown
): Promise<ListPage<VehicleListItem>> {
	const q = parseListQuery(input);
	const where = new Where().and('v.workshop_id = ?', actor.workshopId).and('v.deleted_at IS NULL');
	if (q.customer) where.and('v.customer_id = ?', q.customer);
	if (q.hybrid) where.and('v.hybrid = ?', q.hybrid === 'yes' ? 1 : 0);
	if (q.q) {
		const like = likeOf(q.q);
		where.and(
			`(REPLACE(v.plate, ' ', '') LIKE ? OR v.vin LIKE ? OR v.chassis_no LIKE ?
			  OR CONCAT_WS(' ', v.make, v.model) LIKE ? OR v.engine_code LIKE ? OR c.name LIKE ?)`,
			likeOf(q.q.replace(/\s/g, '')),
			likeOf(q.q.replace(/[\s-]/g, '').toUpperCase()),
			like,
			like,
			like,
			like
		);
	}
	const { ids, total } = await pageOfIds(
		'v.id',
		'vehicles v LEFT JOIN customers c ON c.id = v.customer_id AND c.workshop_id = v.workshop_id',
		where,
		orderBy(q.sort, SORT_COLUMNS, 'v.id'),
		q.page,
		q.pageSize
	);
	const rows = ids.length ? await Vehicle.findAll({ where: { id: ids } }) : [];
	const owners = await Customer.findAll({
		where: {
			workshopId: actor.workshopId,
			id: [...new Set(rows.map((r) => r.customerId).filter((x): x is string => !!x))]
		}
	});
	const names = new Map(owners.map((c) => [c.id, c.name]));
	const items = inOrder(ids, rows).map((r) => {
		const rec = vehicles.toRecord(r as never) as unknown as VehicleRecord;
		const id = rec.customerId;
		return {
			...rec,
			customer: id ? { id, name: names.get(id) ?? '' } : null,
			warnings: warningsOf(rec)
		};
	});
	return { items, total, page: q.page, pageSize: q.pageSize };
}
