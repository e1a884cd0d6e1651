import { error } from '@sveltejs/kit';
import { readJob } from '$lib/local/jobs';
import { partForJob } from '$lib/local/library';
import { local } from '$lib/client/session';

export async function load({ params, parent }) {
	const { me } = await parent();
	const { db } = await local();
	const job = await readJob(db, params.id);
	if (!job) error(404, { message: 'This job is not on this phone.' });
	const part = await partForJob(db, job.id, job.vehicle);
	return { me, job, part };
}
