/**
 * Append-only ops (readings, spark tests, swap tests, sign-offs) in bulk: one lookup of the
 * tests and sheets they refer to, the rulebook's `refuseAppend` for every record (a job the
 * actor sees, sign-offs by leads of apprentices' tests, no apprentice on a hybrid), the server's own result for
 * every reading (the same pure function the phone uses), one block of feed seqs, and one
 * bulk INSERT per table — never a commit per row. The op id and seq live on the record's
 * own row; its author (the signer of a sign-off) is the session's user, never a field.
 *
 * This is the one sanctioned way around `defineAggregate`: these records are never changed
 * once written, so they need no versions, merge or audit of changes, and a push carries
 * hundreds of them (the path `npm run bench:sync` measures).
 *
 * This is the sync hot path (a push carries hundreds of readings): its statements go straight
 * to the transaction's driver connection (`rawQuery`, `rawBatch`), the rows are fully built
 * before the workshop's seq counter is locked, and that lock is held only for the INSERTs and
 * the commit.
 */
import type { Transaction } from 'sequelize';
import { bandsFor, evaluateReading, meterFor, rangeQuantityOf, sameResult, type CheckSpec, type TemperatureSnapshot, type VisualFinding } from '../../flow/reading';
import { rangeResolves } from '../../flow/reading';
import { circuitTestCreate, readingCreate, signoffCreate, sparkTestCreate, swapTestCreate } from '../../schemas/records';
import { judgeCircuit, sameCircuitResult, type CircuitKind } from '../../flow/circuit';
import type { Op, PushResult, Reason } from '../../sync/protocol';
import { stringifyNumbers } from '../../sync/json';
import type { Actor } from '../auth/types';
import { nextSeq } from '../db/feed';
import { rawBatch, rawQuery, sqlDateTime } from '../db/raw';
import { refuseAppend } from '../services/rules';
import { signOffFacts } from '../services/job-facts';
import { addDecision, addReading, addToSummaries as writeSummaries, emptyDelta, type SummaryDelta } from '../db/summaries';
import type { SignOffDecision } from '../../tests/signoff';
import { groupByTable, type AppendTable, type StoredAppendEntity } from '../db/append-tables';
import { quickReadingCreate } from './quick-parse';
import { photoFacts, photoMarkFields } from '../photos/service';
import { refusePhotoMark, type PhotoMark } from '../../photos/marks';

type Ctx = { actor: Actor; t: Transaction };
type TestRow = { id: string; job_id: string; assignee_id: string | null; hybrid: number | bigint | null; technician_id: string | null; sheet_id: string | null; meter: string | null; temperature: string | null; deleted: number | bigint; checks: string | null };
type MeterSetup = Parameters<typeof meterFor>[0];
/** A job as the rulebook needs it for an append-only record. */
type JobInfo = { assigneeId: string | null; hybrid: boolean };
/**
 * A test as the readings need it, its snapshot parsed once per push (and per range read on);
 * `sheetChecks` are its pinned sheet's checks (undefined when that sheet is not found).
 */
type TestInfo = TestRow & {
	/** Its job as the rulebook sees it. */
	job: JobInfo;
	meterSetup: MeterSetup;
	tempSnap: TemperatureSnapshot;
	meters: Map<string, ReturnType<typeof meterFor>>;
	sheetChecks: CheckSpec[] | undefined;
};
const meterOf = (test: TestInfo, rangeLabel: string | null, quantity: string) => {
	const key = `${quantity}|${rangeLabel}`;
	let m = test.meters.get(key);
	if (!m) test.meters.set(key, (m = meterFor(test.meterSetup, rangeLabel, rangeQuantityOf(quantity))));
	return m;
};
/**
 * An op ready to insert: its row, a slot for the seq (filled when the rows are sent) then the
 * values of `COLUMNS[table]` in that order (the creation time is the server's). `same` is what makes a repeated create of a reading the
 * same record (its check and samples).
 */
type Prepared = {
	op: Op;
	table: AppendTable;
	row: unknown[];
	same: string;
	mismatch?: { device: string; server: string };
	/** A reading's part in its test's summary (`test_summaries`). */
	summary?: { testId: string; verdict: string; unresolved: 0 | 1 | null };
	/** A sign-off's decision, for its test's summary. */
	decided?: { testId: string; decision: SignOffDecision };
};

/** The first columns of every append-only row. */
const BASE = ['workshop_id', 'id', 'op_id', 'created_by', 'device_id', 'device_time', 'job_id', 'test_id'] as const;
/**
 * Each table's columns, in the order its rows are built. Rows are plain arrays, not objects:
 * building a 15-key object by spreading another costs more than the rest of a reading.
 */
const COLUMNS: Record<AppendTable, readonly string[]> = {
	readings: [...BASE, 'check_key', 'position', 'samples', 'visual', 'range_label', 'device_result', 'server_result', 'mismatch', 'server_verdict', 'range_unresolved'],
	signoffs: [...BASE, 'mode', 'decision', 'note'],
	spark_tests: [...BASE, 'note', 'position', 'gap_mm', 'outcome'],
	swap_tests: [...BASE, 'note', 'from_position', 'to_position', 'before_counts', 'after_counts', 'conclusion'],
	circuit_tests: [...BASE, 'note', 'kind', 'inputs', 'device_result', 'server_result', 'mismatch', 'server_verdict', 'needs_signoff'],
	// Photos are written by their upload (`photos/service.ts`), never by a push.
	photos: [...BASE],
	photo_marks: [...BASE, 'photo_id', 'mark']
};

const SCHEMAS = { reading: readingCreate, spark_test: sparkTestCreate, swap_test: swapTestCreate, signoff: signoffCreate, photo_mark: photoMarkFields, circuit_test: circuitTestCreate };
const reject = (op: Op, reason: Reason, message?: string) =>
	({ opId: op.opId, status: 'rejected', reason, ...(message ? { message } : {}) }) as PushResult;

/** The tests the ops refer to, with their job's assignee and their pinned sheet's checks. */
async function loadTests(ids: string[], { actor, t }: Ctx) {
	if (!ids.length) return new Map<string, TestInfo>();
	const rows = await rawQuery<TestRow[]>(
		t,
		`SELECT t.id, t.job_id, j.assignee_id, v.hybrid, t.technician_id, t.sheet_id, t.meter, t.temperature,
		        (t.deleted_at IS NOT NULL OR j.deleted_at IS NOT NULL) AS deleted, s.checks
		 FROM tests t JOIN jobs j ON j.id = t.job_id
		 LEFT JOIN vehicles v ON v.id = j.vehicle_id AND v.workshop_id = ?
		 LEFT JOIN spec_sheets s ON s.id = t.sheet_id AND s.workshop_id = ?
		 WHERE t.id IN (?) AND t.workshop_id = ?`,
		[actor.workshopId, actor.workshopId, ids, actor.workshopId]
	);
	const sheets = new Map<string, CheckSpec[]>();
	return new Map(
		rows.map((r) => {
			if (r.sheet_id && r.checks != null && !sheets.has(r.sheet_id)) sheets.set(r.sheet_id, JSON.parse(r.checks));
			const info: TestInfo = {
				...r,
				job: { assigneeId: r.assignee_id, hybrid: Boolean(r.hybrid) },
				meterSetup: r.meter ? (JSON.parse(r.meter) as MeterSetup) : null,
				meters: new Map(),
				tempSnap: r.temperature ? (JSON.parse(r.temperature) as TemperatureSnapshot) : { mode: 'unknown' as const },
				sheetChecks: r.sheet_id ? sheets.get(r.sheet_id) : undefined
			};
			return [r.id, info];
		})
	);
}

async function loadJobs(ids: string[], { actor, t }: Ctx) {
	if (!ids.length) return new Map<string, JobInfo>();
	const rows = await rawQuery<{ id: string; assignee_id: string | null; hybrid: number | bigint | null }[]>(
		t,
		`SELECT j.id, j.assignee_id, v.hybrid FROM jobs j
		 LEFT JOIN vehicles v ON v.id = j.vehicle_id AND v.workshop_id = ?
		 WHERE j.id IN (?) AND j.workshop_id = ? AND j.deleted_at IS NULL`,
		[actor.workshopId, ids, actor.workshopId]
	);
	return new Map(rows.map((r) => [r.id, { assigneeId: r.assignee_id, hybrid: Boolean(r.hybrid) }]));
}

/**
 * `items.map(fn)` in slices, letting the event loop run between them. A push prepares
 * hundreds of readings; done in one go it would hold back every other request of this
 * process — among them another push's commit, whose transaction holds the workshop's feed
 * counter until then, so every pusher of the workshop would wait too.
 */
async function mapInSlices<T, U>(items: T[], fn: (item: T) => U, size = 64): Promise<U[]> {
	const out = new Array<U>(items.length);
	for (let i = 0; i < items.length; i++) {
		if (i > 0 && i % size === 0) await new Promise((resolve) => setImmediate(resolve));
		out[i] = fn(items[i]);
	}
	return out;
}

/** Validate and prepare each op; returns a result for refused ops and a row for the rest. */
async function prepare(ops: Op[], ctx: Ctx): Promise<(Prepared | PushResult)[]> {
	const parsed = ops.map((op) => {
		if (op.entity === 'photo') return { op, error: 'A photo reaches the workshop by its upload, not by sync' };
		const quick = op.entity === 'reading' ? quickReadingCreate(op.fields) : null;
		if (quick) return { op, f: quick as Record<string, unknown> };
		const r = SCHEMAS[op.entity as Exclude<StoredAppendEntity, 'photo'>].safeParse(op.fields);
		return r.success ? { op, f: r.data as Record<string, unknown> } : { op, error: r.error.issues[0].path.join('.') + ': ' + r.error.issues[0].message };
	});
	const ids = (k: string) => [...new Set(parsed.flatMap((p) => ('f' in p && p.f![k] ? [p.f![k] as string] : [])))];
	const tests = await loadTests(ids('testId'), ctx);
	// The photos that marks refer to (their job and author).
	const photos = await photoFacts(ctx.actor, ids('photoId'), ctx.t);
	// Where each signed-off test stands (only when the push carries sign-offs); a circuit test's
	// sign-off names the circuit test, whose job is loaded with the others.
	const signIds = [...new Set(parsed.flatMap((p) => (p.op.entity === 'signoff' && 'f' in p && p.f ? [p.f.testId as string] : [])))];
	const signing = await signOffFacts(ctx.actor, signIds, ctx.t);
	const circuitJobs = [...signing].filter(([id]) => !tests.has(id)).map(([, s]) => s.jobId);
	const jobs = await loadJobs([...new Set([...ids('jobId'), ...circuitJobs, ...[...photos.values()].map((p) => p.jobId)])], ctx);
	return mapInSlices(parsed, (p): Prepared | PushResult => {
		if (!('f' in p) || !p.f) return reject(p.op, 'invalid', (p as { error: string }).error);
		const { op, f } = p;
		/** The seq (set when the rows are sent), the `BASE` columns, then the table's own. */
		const row = (jobId: unknown, testId: unknown, ...rest: unknown[]) => [0, ctx.actor.workshopId, op.entityId, op.opId, ctx.actor.userId, ctx.actor.deviceId, deviceDateTime(op.deviceTime), jobId, testId, ...rest];
		if (op.entity === 'signoff' && !tests.has(f.testId as string) && signing.has(f.testId as string)) {
			// A decision on an apprentice's circuit test: the same rules, no test summary.
			const facts = signing.get(f.testId as string)!;
			const decision = f.decision as SignOffDecision;
			const refusal = refuseAppend(ctx.actor, op.entity, jobs.get(facts.jobId), { ...facts, decision });
			if (refusal) return reject(op, refusal.reason, refusal.message);
			facts.signOff = decision === 'signed' ? 'signed' : 'sent_back';
			return { op, table: 'signoffs', row: row(facts.jobId, f.testId, f.mode, decision, f.note ?? null), same: '' };
		}
		if (op.entity === 'reading' || op.entity === 'signoff') {
			const found = tests.get(f.testId as string);
			const test = found && !Number(found.deleted) ? found : undefined;
			const facts = op.entity === 'signoff' ? signing.get(f.testId as string) : undefined;
			const decision = f.decision as SignOffDecision;
			const refusal = refuseAppend(ctx.actor, op.entity, test?.job, facts && { ...facts, decision });
			if (refusal || !test) return reject(op, refusal?.reason ?? 'not_found', refusal?.message);
			if (op.entity === 'signoff') {
				// A second decision in the same push sees this one.
				if (facts) facts.signOff = decision === 'signed' ? 'signed' : 'sent_back';
				return { op, table: 'signoffs', row: row(test.job_id, test.id, f.mode, decision, f.note ?? null), same: '', decided: { testId: test.id, decision } };
			}
			const checks = test.sheet_id ? test.sheetChecks : null;
			const check = checks?.find((c) => c.key === f.checkKey);
			if (checks && !check) return reject(op, 'invalid', `checkKey: no check ${f.checkKey} on the pinned sheet`);
			const spec = check ?? { key: f.checkKey as string, quantity: 'resistance', unit: 'Ω', openOk: false, bands: [] };
			const visual = (f.visual as VisualFinding | null | undefined) ?? null;
			const meter = meterOf(test, (f.rangeLabel as string | null | undefined) ?? null, spec.quantity);
			const server = evaluateReading(spec, f.samples as never, meter, test.tempSnap, visual);
			const device = f.deviceResult as { value: number | null; verdict: string } | null | undefined;
			const mismatch = device != null && !sameResult(device as never, server);
			// Whether the range could tell a reading from the limits (unknown with no pinned sheet).
			const unresolved: 0 | 1 | null = check ? (rangeResolves(meter, bandsFor(check.bands, test.tempSnap)) ? 0 : 1) : null;
			const samples = JSON.stringify(f.samples);
			const prepared: Prepared = {
				op,
				table: 'readings',
				row: row(test.job_id, test.id, f.checkKey, f.position ?? null, samples, visual ? JSON.stringify(visual) : null, f.rangeLabel ?? null, device ? toJson(device) : null, toJson(server), mismatch ? 1 : 0, server.verdict, unresolved),
				same: `${f.checkKey}|${samples}`,
				summary: { testId: test.id, verdict: server.verdict, unresolved }
			};
			if (mismatch) prepared.mismatch = { device: String(device!.verdict), server: server.verdict };
			return prepared;
		}
		if (op.entity === 'photo_mark') {
			const photo = photos.get(f.photoId as string);
			const job = photo && jobs.get(photo.jobId);
			if (!photo || refuseAppend(ctx.actor, op.entity, job && { ...job, hybrid: false })) return reject(op, 'not_found');
			const why = refusePhotoMark(ctx.actor, photo, f.mark as PhotoMark);
			if (why) return reject(op, 'forbidden', why);
			return { op, table: 'photo_marks', row: row(photo.jobId, photo.testId, f.photoId, f.mark), same: '' };
		}
		const refusal = refuseAppend(ctx.actor, op.entity, jobs.get(f.jobId as string));
		if (refusal) return reject(op, refusal.reason, refusal.message);
		const [jobId, testId, note] = [f.jobId, f.testId ?? null, f.note ?? null];
		if (op.entity === 'circuit_test') {
			// The server's own judgement of the same figures; the phone's is kept beside it.
			let server: ReturnType<typeof judgeCircuit>;
			try {
				server = judgeCircuit(f.kind as CircuitKind, f.inputs as never);
			} catch {
				return reject(op, 'invalid', 'inputs: figures that cannot be judged');
			}
			const device = f.deviceResult as { verdict: string } | null | undefined;
			const mismatch = device != null && !sameCircuitResult(device, server);
			return {
				op,
				table: 'circuit_tests',
				row: row(jobId, testId, note, f.kind, JSON.stringify(f.inputs), device ? JSON.stringify(device) : null, JSON.stringify(server), mismatch ? 1 : 0, server.verdict, ctx.actor.role === 'apprentice' ? 1 : 0),
				same: ''
			};
		}
		if (op.entity === 'spark_test') {
			return { op, table: 'spark_tests', row: row(jobId, testId, note, f.position, f.gapMm, f.outcome), same: '' };
		}
		return {
			op,
			table: 'swap_tests',
			row: row(jobId, testId, note, f.fromPosition, f.toPosition, JSON.stringify(f.beforeCounts), JSON.stringify(f.afterCounts), f.conclusion),
			same: ''
		};
	});
}

/** An ISO device time as DATETIME(3) text in UTC; a plain `…T…Z` time without the Date round trip. */
const ISO_UTC = /^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$/;
const deviceDateTime = (iso: string) =>
	ISO_UTC.test(iso) ? `${iso.slice(0, 10)} ${iso.slice(11, 23)}` : sqlDateTime(new Date(iso));

/** ±Infinity anywhere inside a plain JSON value (an OL reading is Infinity). */
function hasInfinity(v: unknown): boolean {
	if (typeof v === 'number') return v === Infinity || v === -Infinity;
	if (v === null || typeof v !== 'object') return false;
	if (Array.isArray(v)) return v.some(hasInfinity);
	for (const k in v) if (hasInfinity((v as Record<string, unknown>)[k])) return true;
	return false;
}
/** `stringifyNumbers`, through the native JSON.stringify when there is no ±Infinity (same text). */
const toJson = (v: unknown) => (hasInfinity(v) ? stringifyNumbers(v) : JSON.stringify(v));

/**
 * The bulk INSERT of one table's prepared rows (the driver's batch: one statement, all rows),
 * built before the seqs are known. The statement text is the same for every push, so each
 * pooled connection prepares it once. Each row comes with its place among the applied ops;
 * `run(first)` gives it seq `first + place` and sends the rows.
 */
function insertRows(table: AppendTable, rows: { place: number; row: unknown[] }[], { t }: Ctx) {
	const cols = ['seq', ...COLUMNS[table]];
	const sql = `INSERT INTO ${table} (${cols.join(', ')}, created_at) VALUES (${cols.map(() => '?').join(', ')}, UTC_TIMESTAMP(3))`;
	return (first: number) => {
		for (const r of rows) r.row[0] = first + r.place;
		return rawBatch(
			t,
			sql,
			rows.map((r) => r.row)
		);
	};
}

/**
 * Add the readings and sign-off decisions to their tests' summaries (what the lead's
 * overview reads), in the order of the ops: one statement (`db/summaries.ts`).
 */
async function addToSummaries(ok: Prepared[], { actor, t }: Ctx) {
	const per = new Map<string, SummaryDelta>();
	const delta = (testId: string) => {
		let d = per.get(testId);
		if (!d) per.set(testId, (d = emptyDelta()));
		return d;
	};
	for (const p of ok) {
		if (p.summary) addReading(delta(p.summary.testId), p.summary.verdict, p.summary.unresolved);
		else if (p.decided) addDecision(delta(p.decided.testId), p.decided.decision);
	}
	await writeSummaries(t, actor.workshopId, per);
}

/**
 * An id that is already stored (or repeated in this batch under another op id) is a no-op
 * `applied` when it is the same record of the same workshop, else `id_conflict`
 * (`not_found` for another workshop's record).
 */
async function refuseTakenIds(prepared: (Prepared | PushResult)[], { actor, t }: Ctx) {
	const byTable = groupByTable(prepared.filter(hasRow), (p) => p.table, (p) => p.op.entityId);
	if (!byTable.size) return prepared;
	// Each entity's ids in its own table, as a mutable create looks only in its own.
	const taken = new Map<string, { workshop_id: string; same: string }>();
	const rows = await rawQuery<{ tbl: string; id: string; workshop_id: string; same: string }[]>(
		t,
		[...byTable.keys()]
			.map((table) => `SELECT '${table}' AS tbl, x.id, x.workshop_id, ${table === 'readings' ? "CONCAT(x.check_key, '|', x.samples)" : "''"} AS same FROM ${table} x WHERE x.id IN (?)`)
			.join(' UNION ALL '),
		[...byTable.values()]
	);
	for (const r of rows) taken.set(`${r.tbl}|${r.id}`, r);
	const seen = new Set<string>();
	return prepared.map((p) => {
		if (!('table' in p)) return p;
		const key = `${p.table}|${p.op.entityId}`;
		const hit = taken.get(key);
		if (hit && hit.workshop_id !== actor.workshopId) return reject(p.op, 'not_found');
		if (hit) {
			if (hit.same !== p.same) return reject(p.op, 'id_conflict');
			const same: PushResult = { opId: p.op.opId, status: 'applied', version: 1 };
			withoutRow.add(same);
			return same;
		}
		if (seen.has(key)) return reject(p.op, 'id_conflict');
		seen.add(key);
		return p;
	});
}

/**
 * `applied` answers that stored no row (the same record was already there under another op
 * id): nothing keeps their op id, so the caller puts them in the ledger.
 */
export const withoutRow = new WeakSet<PushResult>();

/** A MariaDB duplicate-key error (ER_DUP_ENTRY), as a taken id or op id raises it. */
export const isDuplicateKey = (e: unknown) => (e as { errno?: number } | null)?.errno === 1062;

/** A prepared op: its row, or the answer that refused it. */
export type PreparedOp = Prepared | PushResult;
/** Whether a prepared op has a row to insert (else it is its own refusal). */
export const hasRow = (p: PreparedOp): p is Prepared => 'table' in p;

/**
 * Validate consecutive append-only ops and build their rows (reads only, no lock taken): one
 * entry per op, in order — a row, or the answer that refuses the op.
 */
export const prepareAppendOps = (actor: Actor, ops: Op[], t: Transaction): Promise<PreparedOp[]> =>
	prepare(ops, { actor, t });

/** Apply consecutive append-only ops (prepare, then insert with the id checks). */
export async function applyAppendOps(actor: Actor, ops: Op[], t: Transaction): Promise<PushResult[]> {
	return insertAppendOps(actor, await prepareAppendOps(actor, ops, t), t);
}

/**
 * Insert prepared append-only ops; one result per op, in order. With `checkIds: false` the
 * ids are not looked up first: new ids are the rule, and a taken id or op id makes the INSERT
 * fail with a duplicate key (`isDuplicateKey`), after which the caller rolls back to its
 * savepoint and comes again with the same prepared ops and `checkIds: true`.
 */
export async function insertAppendOps(
	actor: Actor,
	built: PreparedOp[],
	t: Transaction,
	{ checkIds = true }: { checkIds?: boolean } = {}
): Promise<PushResult[]> {
	const ctx = { actor, t };
	const prepared = checkIds ? await refuseTakenIds(built, ctx) : built;
	const ok = prepared.filter(hasRow);
	if (ok.length) {
		// Seqs follow the order of the ops: the k-th applied op gets the block's first + k.
		const byTable = groupByTable(ok.map((p, place) => ({ p, place })), (x) => x.p.table, (x) => ({ place: x.place, row: x.p.row }));
		const inserts = [...byTable].map(([table, rows]) => insertRows(table, rows, ctx));
		const mism = ok.filter((p) => p.mismatch);
		await addToSummaries(ok, ctx);
		// The counter row stays locked from here to the commit: only the INSERTs remain.
		const first = await nextSeq(t, actor.workshopId, ok.length);
		for (const run of inserts) await run(first);
		if (mism.length) {
			await rawQuery(
				t,
				`INSERT INTO reading_mismatches (reading_id, workshop_id, device_verdict, server_verdict, created_at) VALUES ${mism.map(() => '(?, ?, ?, ?, UTC_TIMESTAMP(3))').join(', ')}`,
				mism.flatMap((p) => [p.op.entityId, actor.workshopId, p.mismatch!.device, p.mismatch!.server])
			);
		}
	}
	return prepared.map((p) => ('table' in p ? { opId: p.op.opId, status: 'applied', version: 1 } : p));
}

