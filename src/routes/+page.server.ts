import { redirect } from '@sveltejs/kit';

// The start page is for people; the server's health is at /api/health.
export function load({ locals }) {
	if (locals.user) redirect(303, '/field');
}
