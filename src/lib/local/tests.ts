/**
 * A job's tests as the phone holds them (IndexedDB), drawn with the same view as the office
 * page: readings not sent yet show no workshop result, and the people's names come from the
 * copy kept at the last sync with signal.
 */
import { getMeta, listByJob, setMeta, type LocalDb, type LocalRecord } from '../client/local-db';
import type { Me } from '../client/session';
import type { Role } from '../roles';
import { buildJobTests, type JobTestsView, type SheetChecks } from '../tests/view';
import { readSheet } from './library';

type Person = { id: string; name: string; role: Role };
const PEOPLE = 'people';

/** Keep the workshop's names and roles on the phone (quietly does nothing without signal). */
export async function refreshPeople(db: LocalDb): Promise<void> {
	try {
		const r = await fetch('/api/people', {
			credentials: 'same-origin',
			signal: AbortSignal.timeout(5000)
		});
		if (r.ok) await setMeta(db, PEOPLE, ((await r.json()) as { items: Person[] }).items);
	} catch {
		/* no signal: the names kept last time stay */
	}
}

/** A record as the view reads it; a record made here and not sent yet is the user's own. */
function plain(r: LocalRecord, me: Me, owner: string): Record<string, unknown> {
	const d: Record<string, unknown> = {
		...r.data,
		id: r.id,
		createdAt: r.data.createdAt ?? r.updatedAt
	};
	if (r.version === 0 && d[owner] == null) d[owner] = me.id;
	return d;
}

export async function readJobTests(
	db: LocalDb,
	jobId: string,
	me: Me,
	locale: string
): Promise<JobTestsView> {
	const under = await listByJob(db, jobId);
	const of = (entity: string, owner: string) =>
		under.filter((r) => r.entity === entity).map((r) => plain(r, me, owner));
	const tests = of('test', 'technicianId');
	const sheetIds = [
		...new Set(tests.flatMap((t) => (typeof t.sheetId === 'string' ? [t.sheetId] : [])))
	];
	const sheets = (await Promise.all(sheetIds.map((id) => readSheet(db, id)))).filter(
		(s): s is NonNullable<typeof s> => s !== null
	);
	const people = new Map(
		((await getMeta<Person[]>(db, PEOPLE)) ?? []).map((p) => [p.id, { name: p.name, role: p.role }])
	);
	if (!people.has(me.id)) people.set(me.id, { name: me.name, role: me.role });
	return buildJobTests({
		tests,
		readings: of('reading', 'createdBy'),
		sparks: of('spark_test', 'createdBy'),
		swaps: of('swap_test', 'createdBy'),
		sheets: sheets as SheetChecks[],
		people,
		locale
	});
}
