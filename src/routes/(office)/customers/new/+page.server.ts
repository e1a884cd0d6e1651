import { redirect } from '@sveltejs/kit';
import { readCustomerForm } from '$lib/schemas/customer';
import { guardPage } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { failFrom, valuesOf } from '$lib/server/forms';
import { addCustomer } from '$lib/server/services/customers';

/** `?job=` adds the customer to that job (how apprentices add one). */
export function load(event) {
	guardPage(event);
	return { title: 'New customer', jobId: event.url.searchParams.get('job') ?? '' };
}

export const actions = {
	default: async (event) => {
		const user = guardPage(event);
		const fd = await event.request.formData();
		const jobId = String(fd.get('jobId') ?? '') || null;
		let id: string;
		try {
			id = (await addCustomer(actorOf(user), readCustomerForm(fd), { jobId })).id as string;
		} catch (e) {
			return failFrom(e, valuesOf(fd));
		}
		redirect(303, jobId ? `/jobs/${jobId}` : `/customers/${id}`);
	}
};
