import { error } from '@sveltejs/kit';
import { readJob } from '$lib/local/jobs';
import { local } from '$lib/client/session';
import { CIRCUIT_KINDS, KINDS, type CircuitKind } from '$lib/flow/circuit';
import { listParts } from '$lib/local/library';

export async function load({ params, parent }) {
	const { me } = await parent();
	if (!(CIRCUIT_KINDS as readonly string[]).includes(params.kind)) error(404, { message: 'There is no such test.' });
	const { db } = await local();
	const job = await readJob(db, params.id);
	if (!job) error(404, { message: 'This job is not on this phone.' });
	const kind = params.kind as CircuitKind;
	// The part of this kind that fits the vehicle, whose sheet gives the limits.
	const want = KINDS[kind].part;
	const part = want ? ((await listParts(db, job.vehicle)).find((p) => p.kind === want && p.fits && p.sheet) ?? null) : null;
	return { me, job, kind, part: part && { partNumber: part.partNumber, checks: part.sheet!.checks } };
}
