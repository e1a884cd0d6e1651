import { fail } from '@sveltejs/kit';
import { guardPage, LEADS } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { AppError, ValidationError } from '$lib/server/errors';
import { createUser, listUsers } from '$lib/server/services/workshops';

export async function load(event) {
	const user = guardPage(event, LEADS);
	return { users: await listUsers(user.workshopId) };
}

export const actions = {
	invite: async (event) => {
		const user = guardPage(event, LEADS);
		const data = Object.fromEntries(await event.request.formData()) as Record<string, string>;
		const keep = { name: data.name ?? '', email: data.email ?? '', role: data.role ?? '' };
		if (user.role === 'lead' && !['technician', 'apprentice'].includes(data.role)) {
			return fail(403, {
				...keep,
				fields: { role: 'Leads invite technicians and apprentices only' }
			});
		}
		try {
			await createUser(user.workshopId, data, actorOf(user));
		} catch (e) {
			if (e instanceof ValidationError) return fail(400, { ...keep, fields: e.fields });
			if (e instanceof AppError) return fail(e.status, { ...keep, fields: { _: e.message } });
			if ((e as { name?: string }).name === 'SequelizeUniqueConstraintError') {
				return fail(400, { ...keep, fields: { email: 'Someone already uses this e-mail' } });
			}
			throw e;
		}
		return { invited: keep.email };
	}
};
