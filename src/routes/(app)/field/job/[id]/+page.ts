import { error } from '@sveltejs/kit';
import { readJob } from '$lib/local/jobs';
import { readCircuitTests, readJobTests } from '$lib/local/tests';
import { local } from '$lib/client/session';

export async function load({ params, parent }) {
	const { me } = await parent();
	const { db } = await local();
	const job = await readJob(db, params.id);
	if (!job) error(404, { message: 'This job is not on this phone. Sync with signal, or ask the workshop to assign it to you.' });
	return { me, job, view: await readJobTests(db, params.id, me, navigator.language || 'en'), circuits: await readCircuitTests(db, params.id) };
}
