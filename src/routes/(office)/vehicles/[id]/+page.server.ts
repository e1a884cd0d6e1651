import { error } from '@sveltejs/kit';
import { z } from 'zod';
import { readVehicleForm } from '$lib/schemas/vehicle';
import { guardPage } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { NotFoundError } from '$lib/server/errors';
import { baseVersionOf, failFrom, valuesOf } from '$lib/server/forms';
import { searchJobs } from '$lib/server/services/jobs';
import { editVehicle, readVehicle } from '$lib/server/services/vehicles';
import { customerOptions } from '../../options.server';

export async function load(event) {
	const actor = actorOf(guardPage(event));
	const id = event.params.id;
	if (!z.uuid().safeParse(id).success) error(404, 'No such vehicle');
	const { vehicle, warnings } = await readVehicle(actor, id).catch((e) => {
		if (e instanceof NotFoundError) error(404, 'No such vehicle');
		throw e;
	});
	const [history, owners] = await Promise.all([
		searchJobs(actor, { vehicle: id, status: 'all', sort: '-created', pageSize: 100 }),
		customerOptions(actor, vehicle.customerId)
	]);
	return {
		title: vehicle.plate ?? `${vehicle.make} ${vehicle.model}`,
		vehicle,
		warnings,
		history: history.items,
		owners
	};
}

export const actions = {
	update: async (event) => {
		const actor = actorOf(guardPage(event));
		const fd = await event.request.formData();
		try {
			await editVehicle(actor, event.params.id, baseVersionOf(fd), readVehicleForm(fd));
		} catch (e) {
			return failFrom(e, valuesOf(fd), 'update');
		}
		return { action: 'update', saved: true };
	}
};
