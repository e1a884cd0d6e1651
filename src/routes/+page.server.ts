import { redirect } from '@sveltejs/kit';
import { checkHealth } from '$lib/server/health';

export async function load({ locals }) {
	if (locals.user) redirect(303, '/home');
	return { health: await checkHealth() };
}
