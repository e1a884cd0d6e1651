import { error } from '@sveltejs/kit';
import { getMeta, listByJob } from '$lib/client/local-db';
import { local } from '$lib/client/session';
import { readJob } from '$lib/local/jobs';
import { readJobTests } from '$lib/local/tests';
import type { PhonePricing } from './quote-form';

/** The job, its failed parts, the phone's copy of the price list and the job's quotes (IndexedDB). */
export async function load({ params, parent }) {
	const { me } = await parent();
	const { db } = await local();
	const job = await readJob(db, params.id);
	if (!job) error(404, { message: 'This job is not on this phone. Sync with signal, or ask the workshop to assign it to you.' });
	const view = await readJobTests(db, params.id, me, navigator.language || 'en');
	const failed = view.tests
		.filter((t) => t.checks.some((c) => c.readings.some((r) => ['high', 'low', 'open'].includes((r.workshop ?? r.phone)?.key ?? ''))))
		.map((t) => ({ testId: t.id, partNumber: t.partNumber }));
	const quotes = (await listByJob(db, params.id)).filter((r) => r.entity === 'quote');
	return { me, job, failed, pricing: (await getMeta<PhonePricing>(db, 'pricing')) ?? null, quotes };
}
