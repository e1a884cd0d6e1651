import { getMeters } from '$lib/local/library';
import { local } from '$lib/client/session';

export async function load({ parent, url }) {
	const { me } = await parent();
	const { db } = await local();
	return { me, meters: await getMeters(db), back: url.searchParams.get('back') ?? '/field' };
}
