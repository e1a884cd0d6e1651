import { error } from '@sveltejs/kit';
import { readJob } from '$lib/local/jobs';
import { listByJob } from '$lib/client/local-db';
import { local } from '$lib/client/session';

export async function load({ params, parent }) {
	const { me } = await parent();
	const { db } = await local();
	const job = await readJob(db, params.id);
	if (!job) error(404, { message: 'This job is not on this phone. Sync with signal, or ask the workshop to assign it to you.' });
	const under = await listByJob(db, params.id);
	return { me, job, tests: under.filter((r) => r.entity === 'test'), sparks: under.filter((r) => r.entity === 'spark_test'), swaps: under.filter((r) => r.entity === 'swap_test') };
}
