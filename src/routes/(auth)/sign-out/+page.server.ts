import { redirect } from '@sveltejs/kit';
import { endEverySession } from '$lib/server/auth/session';

export function load({ locals }) {
	if (!locals.user) redirect(303, '/sign-in');
	return { name: locals.user.name };
}

export const actions = {
	/** Sign out everywhere: every session of this user ends (OWASP ASVS 5.0 §7.4.1). */
	default: async ({ locals, cookies, url }) => {
		if (locals.user) await endEverySession(locals.user.id, cookies, url);
		locals.user = null;
		locals.sessionId = null;
		redirect(303, '/sign-in');
	}
};
