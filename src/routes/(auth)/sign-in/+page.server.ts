import { fail, redirect } from '@sveltejs/kit';
import { z } from 'zod';
import { startSession } from '$lib/server/auth/session';
import { checkCredentials } from '$lib/server/auth/sign-in';

const form = z.object({
	email: z.string().trim().min(1, 'Enter your e-mail').max(254),
	password: z.string().min(1, 'Enter your password').max(200)
});

const safeNext = (n: string | null) =>
	n && n.startsWith('/') && !n.startsWith('//') ? n : '/field';

export function load({ locals, url }) {
	if (locals.user) redirect(303, safeNext(url.searchParams.get('next')));
}

export const actions = {
	default: async ({ request, cookies, url, getClientAddress, locals }) => {
		const data = Object.fromEntries(await request.formData());
		const parsed = form.safeParse(data);
		const email = typeof data.email === 'string' ? data.email : '';
		if (!parsed.success) {
			const fields = Object.fromEntries(parsed.error.issues.map((i) => [i.path[0], i.message]));
			return fail(400, { email, fields, message: null });
		}
		const result = await checkCredentials(
			parsed.data.email,
			parsed.data.password,
			getClientAddress()
		);
		if (!result.ok) {
			return fail(result.status, {
				email,
				fields: {},
				message: result.message,
				retryAfter: result.retryAfter
			});
		}
		if (locals.sessionId) {
			const { endSession } = await import('$lib/server/auth/session');
			await endSession(locals.sessionId, cookies, url);
		}
		await startSession(result.userId, cookies, url);
		redirect(303, safeNext(url.searchParams.get('next')));
	}
};
