import { error } from '@sveltejs/kit';
import { z } from 'zod';
import { readCustomerForm } from '$lib/schemas/customer';
import { guardPage } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { NotFoundError } from '$lib/server/errors';
import { baseVersionOf, failFrom, valuesOf } from '$lib/server/forms';
import * as customers from '$lib/server/services/customers';
import { searchJobs } from '$lib/server/services/jobs';
import { searchVehicles } from '$lib/server/services/vehicles';

export async function load(event) {
	const actor = actorOf(guardPage(event));
	const id = event.params.id;
	if (!z.uuid().safeParse(id).success) error(404, 'No such customer');
	const customer = await customers.read(actor, id).catch((e) => {
		if (e instanceof NotFoundError) error(404, 'No such customer');
		throw e;
	});
	const [vehicles, jobs] = await Promise.all([
		searchVehicles(actor, { customer: id, sort: 'plate', pageSize: 100 }),
		searchJobs(actor, { customer: id, status: 'all', sort: '-created', pageSize: 100 })
	]);
	return {
		title: String(customer.name),
		customer: customer as unknown as customers.CustomerRecord,
		vehicles: vehicles.items,
		jobs: jobs.items
	};
}

export const actions = {
	update: async (event) => {
		const actor = actorOf(guardPage(event));
		const fd = await event.request.formData();
		try {
			await customers.editCustomer(actor, event.params.id, baseVersionOf(fd), readCustomerForm(fd));
		} catch (e) {
			return failFrom(e, valuesOf(fd), 'update');
		}
		return { action: 'update', saved: true };
	}
};
