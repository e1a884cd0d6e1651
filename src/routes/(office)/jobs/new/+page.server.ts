import { redirect } from '@sveltejs/kit';
import { readJobForm } from '$lib/schemas/job';
import { guardPage } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { failFrom, valuesOf } from '$lib/server/forms';
import { addJob } from '$lib/server/services/jobs';
import { readVehicle } from '$lib/server/services/vehicles';
import { jobFormOptions } from '../../options.server';

/** `?vehicle=` and `?customer=` preselect (a job opened from a vehicle or customer page). */
export async function load(event) {
	const actor = actorOf(guardPage(event));
	const vehicleId = event.url.searchParams.get('vehicle') ?? '';
	const vehicle = vehicleId ? await readVehicle(actor, vehicleId).catch(() => null) : null;
	const customerId =
		event.url.searchParams.get('customer') ?? (vehicle?.vehicle.customerId as string | null) ?? '';
	return {
		title: 'New job',
		hybrid: Boolean(vehicle?.vehicle.hybrid),
		preset: { vehicleId: vehicle ? vehicleId : '', customerId: customerId ?? '' },
		...(await jobFormOptions(actor, { vehicleId, customerId }))
	};
}

export const actions = {
	default: async (event) => {
		const user = guardPage(event);
		const fd = await event.request.formData();
		const values = valuesOf(fd);
		let id: string;
		try {
			id = (await addJob(actorOf(user), readJobForm(fd))).id as string;
		} catch (e) {
			return failFrom(e, values);
		}
		redirect(303, `/jobs/${id}`);
	}
};
