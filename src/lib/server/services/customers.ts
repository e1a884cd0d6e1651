/** Customers on the one write path, with the checks and lists the API and the pages use. */
import { Op, QueryTypes } from 'sequelize';
import { z } from 'zod';
import {
	customerCreate,
	customerListQuery,
	customerPatch,
	type CustomerListQuery
} from '../../schemas/customer';
import type { ListPage } from '../../schemas/common';
import { db } from '../db';
import { Customer } from '../db/models';
import { customerRecord } from '../db/records';
import type { Actor } from '../auth/types';
import { ValidationError } from '../errors';
import { attachToJob, jobForAttach } from './jobs';
import { customerRules } from './rules';
import { inOrder, likeOf, orderBy, pageOfIds, Where } from './list-sql';
import { defineAggregate, inTransaction } from './write-path';

const aggregate = defineAggregate({
	entity: 'customer',
	model: Customer,
	createSchema: customerCreate,
	patchSchema: customerPatch,
	rules: customerRules,
	toRecord: customerRecord
});

export const { create, update, remove, read, toRecord, def, entity, check, clientInput } = aggregate;
/** A customer as the API and the change feed send it. */
export type CustomerRecord = {
	id: string;
	version: number;
	name: string;
	phone: string | null;
	email: string | null;
	reportConsent: boolean;
	deleted: boolean;
	updatedAt: Date;
};

/** Customers of the actor's workshop whose name, phone or e-mail contains `q`. */
export async function list(actor: Actor, q = '', limit = 50) {
	const like = { [Op.like]: likeOf(q) };
	const rows = await Customer.findAll({
		where: {
			workshopId: actor.workshopId,
			deletedAt: { [Op.is]: null },
			...(q ? { [Op.or]: [{ name: like }, { phone: like }, { email: like }] } : {})
		},
		order: [['name', 'ASC']],
		limit
	});
	return rows.map((r) => toRecord(r as never));
}

/** Parse a list query (400 naming the parameter). */
export function parseListQuery(input: unknown): CustomerListQuery {
	const r = customerListQuery.safeParse(input);
	if (!r.success) throw ValidationError.fromZod(r.error);
	return r.data;
}

const SORT_COLUMNS = { name: 'c.name', created: 'c.created_at', updated: 'c.updated_at' };

/**
 * One page of the workshop's customers: `q` matches name, e-mail or phone (spaces in the
 * phone ignored); `consent` filters on report consent. Each item has its number of vehicles.
 */
export async function searchCustomers(
	actor: Actor,
	input: unknown
): Promise<ListPage<CustomerRecord & { vehicleCount: number }>> {
	const query = parseListQuery(input);
	const where = new Where().and('c.workshop_id = ?', actor.workshopId).and('c.deleted_at IS NULL');
	if (query.q) {
		const like = likeOf(query.q);
		const digits = likeOf(query.q.replace(/\s/g, ''));
		where.and(
			"(c.name LIKE ? OR c.email LIKE ? OR REPLACE(c.phone, ' ', '') LIKE ?)",
			like,
			like,
			digits
		);
	}
	if (query.consent) where.and('c.report_consent = ?', query.consent === 'yes' ? 1 : 0);
	const { ids, total } = await pageOfIds(
		'c.id',
		'customers c',
		where,
		orderBy(query.sort, SORT_COLUMNS, 'c.id'),
		query.page,
		query.pageSize
	);
	const rows = ids.length ? await Customer.findAll({ where: { id: ids } }) : [];
	const counts = await countVehicles(actor, ids);
	const items = inOrder(ids, rows).map((r) => ({
		...(toRecord(r as never) as unknown as CustomerRecord),
		vehicleCount: counts.get(r.id) ?? 0
	}));
	return { items, total, page: query.page, pageSize: query.pageSize };
}

async function countVehicles(actor: Actor, ids: string[]) {
	if (!ids.length) return new Map<string, number>();
	const rows = await db().query<{ id: string; n: number | bigint }>(
		`SELECT customer_id AS id, COUNT(*) AS n FROM vehicles
		 WHERE workshop_id = ? AND deleted_at IS NULL AND customer_id IN (?) GROUP BY customer_id`,
		{ replacements: [actor.workshopId, ids], type: QueryTypes.SELECT }
	);
	return new Map(rows.map((r) => [r.id, Number(r.n)]));
}

const jobRef = z.uuid().nullable().optional();

/**
 * Add a customer. With `jobId`, the customer is put on that job in the same transaction
 * (apprentices must name one of their own jobs: 403 otherwise).
 */
export async function addCustomer(actor: Actor, input: unknown, o: { jobId?: unknown } = {}) {
	const ref = jobRef.safeParse(o.jobId || null);
	if (!ref.success) throw new ValidationError({ jobId: 'Not a valid job id' });
	return inTransaction(undefined, async (t) => {
		const job = ref.data ? await jobForAttach(actor, ref.data, t) : null;
		const rec = await create(actor, input, { transaction: t, via: { jobId: job?.id } });
		if (job) await attachToJob(actor, job, { customerId: rec.id as string }, t);
		return rec;
	});
}

/** Change a customer the actor saw at `baseVersion` (apprentices: only on their own jobs). */
export async function editCustomer(actor: Actor, id: string, baseVersion: number, input: unknown) {
	return update(actor, id, baseVersion, input);
}
