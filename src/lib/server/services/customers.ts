/** Customers: the first aggregate on the one write path. */
import { Op } from 'sequelize';
import { customerCreate, customerPatch } from '../../schemas/customer';
import { Customer } from '../db/models';
import type { Actor } from '../auth/types';
import { defineAggregate } from './write-path';

const aggregate = defineAggregate({
	entity: 'customer',
	model: Customer,
	createSchema: customerCreate,
	patchSchema: customerPatch,
	toRecord: (r) => ({
		id: r.id,
		version: r.version,
		name: r.get('name'),
		phone: r.get('phone'),
		email: r.get('email'),
		reportConsent: Boolean(r.get('reportConsent')),
		deleted: r.deletedAt != null,
		updatedAt: r.get('updatedAt')
	})
});

export const { create, update, remove, read, toRecord } = aggregate;

/** Customers of the actor's workshop whose name, phone or e-mail contains `q`. */
export async function list(actor: Actor, q = '', limit = 50) {
	const like = { [Op.like]: `%${q.replace(/[%_\\]/g, '\\$&')}%` };
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
