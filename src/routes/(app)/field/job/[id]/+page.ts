import { error } from '@sveltejs/kit';
import { readJob } from '$lib/local/jobs';
import { readCircuitTests, readJobTests } from '$lib/local/tests';
import { fetchJobOnDemand } from '$lib/client/engine';
import { local } from '$lib/client/session';

export async function load({ params, parent }) {
	const { me } = await parent();
	const { db } = await local();
	let job = await readJob(db, params.id);
	// Not on the phone (closed before the phone's window): with signal, fetch it for this visit.
	if (!job && navigator.onLine && (await fetchJobOnDemand(db, params.id))) job = await readJob(db, params.id);
	if (!job) error(404, { message: 'This job is not on this phone. Sync with signal, or ask the workshop to assign it to you.' });
	return { me, job, view: await readJobTests(db, params.id, me, navigator.language || 'en'), circuits: await readCircuitTests(db, params.id, me) };
}
