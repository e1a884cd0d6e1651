import { listIssues } from '$lib/client/issues';
import { listOutbox } from '$lib/client/outbox';
import { local } from '$lib/client/session';

export async function load({ parent }) {
	const { me } = await parent();
	const { db } = await local();
	return { me, waiting: await listOutbox(db), issues: await listIssues(db) };
}
