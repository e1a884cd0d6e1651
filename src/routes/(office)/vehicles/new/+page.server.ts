import { redirect } from '@sveltejs/kit';
import { readVehicleForm } from '$lib/schemas/vehicle';
import { guardPage } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { failFrom, valuesOf } from '$lib/server/forms';
import { addVehicle } from '$lib/server/services/vehicles';
import { customerOptions } from '../../options.server';

/** `?customer=` preselects the owner; `?job=` adds the vehicle to that job (how apprentices add one). */
export async function load(event) {
	const actor = actorOf(guardPage(event));
	const customerId = event.url.searchParams.get('customer') ?? '';
	return {
		title: 'New vehicle',
		jobId: event.url.searchParams.get('job') ?? '',
		preset: { customerId },
		owners: await customerOptions(actor, customerId)
	};
}

export const actions = {
	default: async (event) => {
		const user = guardPage(event);
		const fd = await event.request.formData();
		const jobId = String(fd.get('jobId') ?? '') || null;
		let id: string;
		try {
			id = (await addVehicle(actorOf(user), readVehicleForm(fd), { jobId })).vehicle.id;
		} catch (e) {
			return failFrom(e, valuesOf(fd));
		}
		redirect(303, jobId ? `/jobs/${jobId}` : `/vehicles/${id}`);
	}
};
