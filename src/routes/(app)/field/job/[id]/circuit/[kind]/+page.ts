import { error } from '@sveltejs/kit';
import { readJob } from '$lib/local/jobs';
import { local } from '$lib/client/session';
import { CIRCUIT_KINDS, type CircuitKind } from '$lib/flow/circuit';

export async function load({ params, parent }) {
	const { me } = await parent();
	if (!(CIRCUIT_KINDS as readonly string[]).includes(params.kind)) error(404, { message: 'There is no such test.' });
	const { db } = await local();
	const job = await readJob(db, params.id);
	if (!job) error(404, { message: 'This job is not on this phone.' });
	return { me, job, kind: params.kind as CircuitKind };
}
