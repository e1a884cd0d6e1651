import { error } from '@sveltejs/kit';
import { readJob } from '$lib/local/jobs';
import { getLeadZero, getMeters, listParts } from '$lib/local/library';
import { local } from '$lib/client/session';
import { readRetest } from '$lib/local/retest';

export async function load({ params, parent, url }) {
	const { me } = await parent();
	const { db } = await local();
	const job = await readJob(db, params.id);
	if (!job) error(404, { message: 'This job is not on this phone.' });
	const [parts, meters, leadZero] = await Promise.all([listParts(db, job.vehicle), getMeters(db), getLeadZero(db)]);
	const retest = await readRetest(db, params.id, url.searchParams.get('retest'));
	return { me, job, parts, meters, leadZero, retest };
}
