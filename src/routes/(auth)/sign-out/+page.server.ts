import { redirect } from '@sveltejs/kit';
import { endSession } from '$lib/server/auth/session';

export function load({ locals }) {
	if (!locals.user) redirect(303, '/sign-in');
	return { name: locals.user.name };
}

export const actions = {
	default: async ({ locals, cookies, url }) => {
		if (locals.sessionId) await endSession(locals.sessionId, cookies, url);
		locals.user = null;
		locals.sessionId = null;
		redirect(303, '/sign-in');
	}
};
