import { error } from '@sveltejs/kit';
import { readJob } from '$lib/local/jobs';
import { getLastLeadZero, getMeters, listParts } from '$lib/local/library';
import { local } from '$lib/client/session';
import { readRetest } from '$lib/local/retest';

export async function load({ params, parent, url }) {
	const { me } = await parent();
	const { db } = await local();
	const job = await readJob(db, params.id);
	if (!job) error(404, { message: 'This job is not on this phone.' });
	const [parts, meters, lastLeads] = await Promise.all([listParts(db, job.vehicle), getMeters(db), getLastLeadZero(db)]);
	const retest = await readRetest(db, params.id, url.searchParams.get('retest'));
	return { me, job, parts, meters, lastLeads, retest };
}
