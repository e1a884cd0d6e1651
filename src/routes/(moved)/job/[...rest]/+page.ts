import { redirect } from '@sveltejs/kit';

export function load({ params, url }) {
	redirect(308, `/field/job/${params.rest}${url.search}`);
}
