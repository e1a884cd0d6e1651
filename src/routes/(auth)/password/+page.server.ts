import { fail, redirect } from '@sveltejs/kit';
import { changePassword } from '$lib/server/auth/account';
import { guardPage } from '$lib/server/auth/guards';
import { endEverySession, startSession } from '$lib/server/auth/session';

export function load(event) {
	const user = guardPage(event);
	return { name: user.name, changed: event.url.searchParams.has('changed') };
}

export const actions = {
	/** Guard → check and store → end every session of the user → a fresh one here (ASVS §7.4.3). */
	default: async (event) => {
		const user = guardPage(event);
		const fd = await event.request.formData();
		const input = { current: fd.get('current'), next: fd.get('next'), repeat: fd.get('repeat') };
		const result = await changePassword(user, input, event.getClientAddress());
		if (!result.ok) return fail(result.status, { fields: result.fields, message: result.message ?? null });
		await endEverySession(user.id, event.cookies, event.url);
		await startSession(user.id, event.cookies, event.url);
		redirect(303, '/password?changed');
	}
};
