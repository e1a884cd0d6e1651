// The technician's screens render in the browser from IndexedDB, so they open with no
// signal. The API behind them is guarded on the server as usual.
import { redirect } from '@sveltejs/kit';
import { local, NeedsSignIn } from '$lib/client/session';

export const ssr = false;

export async function load({ url }) {
	try {
		const { me } = await local();
		return { me };
	} catch (e) {
		if (e instanceof NeedsSignIn) redirect(307, `/sign-in?next=${encodeURIComponent(url.pathname)}`);
		throw e;
	}
}
