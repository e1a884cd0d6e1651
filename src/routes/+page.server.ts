import { redirect } from '@sveltejs/kit';
import { checkHealth } from '$lib/server/health';

export async function load({ locals }) {
	if (locals.user) redirect(303, '/field');
	return { health: await checkHealth() };
}
