import { error } from '@sveltejs/kit';
import { readJob } from '$lib/local/jobs';
import { listUnder, readPart, readSheet } from '$lib/local/library';
import { getRecord } from '$lib/client/local-db';
import { local } from '$lib/client/session';

export async function load({ params, parent }) {
	const { me } = await parent();
	const { db } = await local();
	const [job, test] = await Promise.all([readJob(db, params.id), getRecord(db, 'test', params.testId)]);
	if (!job || !test) error(404, { message: 'This test is not on this phone.' });
	const [sheet, part] = await Promise.all([
		test.data.sheetId ? readSheet(db, test.data.sheetId as string) : null,
		test.data.componentId ? readPart(db, test.data.componentId as string) : null
	]);
	if (!sheet) error(404, { message: 'The spec sheet pinned to this test is not on this phone. Sync with signal.' });
	const readings = (await listUnder(db, params.id, 'reading')).filter((r) => r.data.testId === params.testId);
	return { me, job, test, sheet, part, readings };
}
