/**
 * A re-test after the repair starts from its first test on this phone: the same part, meter
 * and positions, linked to the first test (a re-test of a re-test links to the first one).
 */
import { getRecord, type LocalDb } from '../client/local-db';
import { positionsOf } from '../tests/facts';

export type RetestStart = {
	/** The first test, which the re-test names as `retestOf`. */
	id: string;
	componentId: string | null;
	partNumber: string | null;
	positions: string[];
	meterName: string | null;
};

/** The first test to re-test for `testId` on job `jobId`, or null when it is not on this phone. */
export async function readRetest(
	db: LocalDb,
	jobId: string,
	testId: string | null
): Promise<RetestStart | null> {
	if (!testId) return null;
	let test = await getRecord(db, 'test', testId);
	const first = test?.data.retestOf as string | null | undefined;
	if (first) test = await getRecord(db, 'test', first);
	if (!test || test.data.jobId !== jobId) return null;
	const d = test.data;
	return {
		id: test.id,
		componentId: (d.componentId as string | null) ?? null,
		partNumber: (d.partNumber as string | null) ?? null,
		positions: positionsOf(d.position),
		meterName: ((d.meter as { name?: string } | null)?.name as string | undefined) ?? null
	};
}
