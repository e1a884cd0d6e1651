import { error } from '@sveltejs/kit';
import type { Me } from '$lib/client/session';
import { local } from '$lib/client/session';
import { readJob } from '$lib/local/jobs';
import { partForJob } from '$lib/local/library';

/**
 * The load of the spark and swap screens: the job on this phone (404 when it is not) and the
 * part it is being tested on (`partForJob`).
 */
export async function loadJobAndPart({ params, parent }: { params: { id: string }; parent: () => Promise<{ me: Me }> }) {
	const { me } = await parent();
	const { db } = await local();
	const job = await readJob(db, params.id);
	if (!job) error(404, { message: 'This job is not on this phone.' });
	const part = await partForJob(db, job.id, job.vehicle);
	return { me, job, part };
}
