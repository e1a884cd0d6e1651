/**
 * A job's tests as the phone holds them (IndexedDB), drawn with the same view as the office
 * page: readings not sent yet show no workshop result, and the people's names come from the
 * copy kept at the last sync with signal. Also what the job's status rules and the job list
 * read: sign-off states and the facts of `refuseRetestedOk` / `refuseClose`.
 */
import { getMeta, listByJob, setMeta, type LocalDb, type LocalRecord } from '../client/local-db';
import type { Me } from '../client/session';
import type { Role } from '../roles';
import { buildJobTests, signOffViewOf, type JobTestsView, type SheetChecks, type SignOffView } from '../tests/view';
import { jobFactsOf, positionsText, signOffStates, type FactDecision, type FactReading, type FactTest } from '../tests/facts';
import { circuitSignOffStates, closingCircuits, type FactCircuit } from '../tests/circuit-signoff';
import { KINDS, type CircuitKind } from '../flow/circuit';
import type { JobFacts } from '../rules';
import { listIssues } from '../client/issues';
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

/** Records this phone has not sent yet come after everything the workshop has (see `order`). */
const NOT_SENT = 1e15;

/**
 * A record as the view reads it; a record made here and not sent yet is the user's own.
 * `order` is its place among the records of the job: the time it reached the workshop, and
 * after all of those what is still on this phone only.
 */
function plain(r: LocalRecord, me: Me, owner: string): Record<string, unknown> {
	const d: Record<string, unknown> = {
		...r.data,
		id: r.id,
		createdAt: r.data.createdAt ?? r.updatedAt
	};
	if (r.version === 0 && d[owner] == null) d[owner] = me.id;
	// The server marks an apprentice's test for sign-off; until it says so, this phone does.
	if (r.entity === 'test' && d.needsSignOff == null)
		d.needsSignOff = d.technicianId === me.id && me.role === 'apprentice';
	if (r.entity === 'circuit_test' && d.needsSignOff == null)
		d.needsSignOff = d.createdBy === me.id && me.role === 'apprentice';
	const arrived = Date.parse(String(r.data.createdAt ?? ''));
	d.order = r.version === 0 || Number.isNaN(arrived) ? NOT_SENT + Date.parse(r.updatedAt) : arrived;
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
		signoffs: of('signoff', 'createdBy'),
		sparks: of('spark_test', 'createdBy'),
		swaps: of('swap_test', 'createdBy'),
		sheets: sheets as SheetChecks[],
		people,
		locale
	});
}

/** A job's tests, readings and sign-off decisions on this phone, as the status rules read them. */
async function factRecords(db: LocalDb, jobId: string, me: Me) {
	const under = await listByJob(db, jobId);
	const of = (entity: string, owner = 'createdBy') =>
		under.filter((r) => r.entity === entity).map((r) => plain(r, me, owner));
	const verdict = (r: Record<string, unknown>) =>
		((r.serverResult ?? r.deviceResult) as { verdict?: string } | null | undefined)?.verdict ?? null;
	const tests = of('test', 'technicianId')
		.sort((a, b) => Number(a.order) - Number(b.order))
		.map(
			(t): FactTest => ({
				id: String(t.id),
				partNumber: (t.partNumber as string | null) ?? null,
				position: (t.position as string | null) ?? null,
				state: String(t.state ?? 'in_progress'),
				needsSignOff: Boolean(t.needsSignOff),
				retestOf: (t.retestOf as string | null) ?? null
			})
		);
	const readings = of('reading').map(
		(r): FactReading => ({
			testId: String(r.testId),
			checkKey: String(r.checkKey),
			position: (r.position as string | null) ?? null,
			verdict: verdict(r),
			order: Number(r.order)
		})
	);
	const decisions = of('signoff').map(
		(d): FactDecision => ({
			testId: String(d.testId),
			decision: d.decision === 'sent_back' ? 'sent_back' : 'signed',
			mode: d.mode === 'remote' ? 'remote' : 'witnessed',
			note: (d.note as string | null) ?? null,
			by: (d.createdBy as string | null) ?? null,
			at: (d.createdAt as string | null) ?? null,
			order: Number(d.order)
		})
	);
	const circuits = of('circuit_test')
		.sort((a, b) => Number(a.order) - Number(b.order))
		.map(
			(c): FactCircuit => ({
				id: String(c.id),
				kind: String(c.kind),
				needsSignOff: Boolean(c.needsSignOff),
				order: Number(c.order)
			})
		);
	return { tests, readings, decisions, circuits };
}

/**
 * What the status rules read of a job on this phone: its tests, readings and sign-offs, and
 * the clashes this phone made on the job or its tests that the lead has not settled yet.
 * The workshop checks again with everything it holds.
 */
export async function readJobFacts(db: LocalDb, jobId: string, me: Me): Promise<JobFacts> {
	const { tests, readings, decisions, circuits } = await factRecords(db, jobId, me);
	const ids = new Set([jobId, ...tests.map((t) => t.id)]);
	const clashes = (await listIssues(db)).filter((i) => i.kind === 'conflict' && ids.has(i.op.entityId)).length;
	return { ...jobFactsOf(tests, readings, decisions, clashes), circuits: closingCircuits(circuits, decisions) };
}

/** One apprentice test on the job list: its part and positions, and a send-back's note. */
export type SignOffLine = { id: string; part: string; note: string | null };
export type JobSignOffs = { waiting: SignOffLine[]; sentBack: SignOffLine[]; signed: number };

/**
 * Per job: its apprentice tests that wait for a lead's sign-off, those sent back (with the
 * note), and how many are signed off — what the job list shows.
 */
export async function signOffSummary(db: LocalDb, jobIds: string[], me: Me): Promise<Map<string, JobSignOffs>> {
	const out = new Map<string, JobSignOffs>();
	for (const jobId of jobIds) {
		const { tests, readings, decisions, circuits } = await factRecords(db, jobId, me);
		const states = signOffStates(tests, readings, decisions);
		const sum: JobSignOffs = { waiting: [], sentBack: [], signed: 0 };
		for (const t of tests) {
			const s = states.get(t.id)!;
			const where = positionsText(t.position);
			const line = { id: t.id, part: `${t.partNumber ?? 'Part not named'}${where ? ` · ${where}` : ''}`, note: null };
			if (s.kind === 'waiting') sum.waiting.push(line);
			else if (s.kind === 'sent_back') sum.sentBack.push({ ...line, note: s.last.note });
			else if (s.kind === 'signed') sum.signed++;
		}
		// Circuit tests (battery, charging, …) by the same rule; one done again since is left out.
		for (const [id, c] of circuitSignOffStates(circuits, decisions)) {
			const kind = circuits.find((x) => x.id === id)!.kind;
			const line = { id, part: KINDS[kind as CircuitKind]?.title ?? 'Circuit test', note: null };
			if (c.state.kind === 'waiting') sum.waiting.push(line);
			else if (c.state.kind === 'sent_back' && !c.replaced) sum.sentBack.push({ ...line, note: c.state.last.note });
			else if (c.state.kind === 'signed') sum.signed++;
		}
		out.set(jobId, sum);
	}
	return out;
}

/** A circuit test (battery, draw, drop, charging, relay, sensor) as the job page lists it. */
export type CircuitTestItem = {
	id: string;
	kind: string;
	verdict: string;
	summary: string;
	pending: boolean;
	at: string;
	/** An apprentice's waits for a lead's sign-off (when `me` is given). */
	signOff?: SignOffView;
};

/**
 * The job's circuit tests on this phone, newest first: the server's result once it has one,
 * and with `me`, where an apprentice's stands with its sign-off (one sent back and done again
 * since says nothing more).
 */
export async function readCircuitTests(db: LocalDb, jobId: string, me?: Me): Promise<CircuitTestItem[]> {
	const under = await listByJob(db, jobId);
	let views = new Map<string, SignOffView>();
	if (me) {
		const { circuits, decisions } = await factRecords(db, jobId, me);
		const people = new Map(((await getMeta<Person[]>(db, PEOPLE)) ?? []).map((p) => [p.id, { name: p.name, role: p.role }]));
		if (!people.has(me.id)) people.set(me.id, { name: me.name, role: me.role });
		views = new Map(
			[...circuitSignOffStates(circuits, decisions)]
				.filter(([, c]) => !c.replaced)
				.map(([id, c]) => [id, signOffViewOf(c.state, people)])
		);
	}
	return under
		.filter((r) => r.entity === 'circuit_test')
		.map((r) => {
			const d = r.data as Record<string, unknown>;
			const res = (d.serverResult ?? d.deviceResult ?? {}) as { verdict?: string; summary?: string };
			return { id: r.id, kind: String(d.kind), verdict: res.verdict ?? 'cant_tell', summary: res.summary ?? '', pending: r.pending > 0, at: String(d.createdAt ?? r.updatedAt), signOff: views.get(r.id) };
		})
		.sort((a, b) => b.at.localeCompare(a.at));
}
