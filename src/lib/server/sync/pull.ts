/**
 * GET /api/sync/pull: what changed after `cursor` in the caller's scope (`scope.ts`), at most
 * `limit` changes, in seq order.
 *
 * Reading (both versions): the scope is applied in SQL. The jobs in scope are read once
 * (`seenJobsSql`); then each source is read from its own index, at most `limit` rows after
 * the cursor: the append-only tables by `(job_id, seq)` for those jobs, and the change feed
 * by `(workshop_id, audience, seq)` (rows for this user), `(workshop_id, job_id, seq)` (rows
 * of those jobs) and `(workshop_id, entity, seq)` (library, customers, vehicles). Leads and
 * owners read the feed in seq order, keeping rows of no job or of a job in their window. The
 * sources are merged; the page ends at the lowest seq up to which every source was read in
 * full, so nothing is skipped, and when no source was cut the cursor moves to the end of the
 * feed: a phone with little to see needs one round trip whatever the workshop wrote.
 *
 * Version 1 (no `v`): the feed from the cursor; a cursor ahead of the feed, or older than
 * what the feed keeps, is a 400.
 *
 * Version 2 (`v=2`, the phone's): a cursor of 0, or one older than the kept feed
 * (`change_counters.floor_seq`, see `trimFeed`), gets a **snapshot**: the current records in
 * scope — every mutable entity of the sync registry, then every append-only table — paged
 * with a `snapshot` token (`base.step.after`), with `reset: true` on its first page; then the
 * feed from `base`. The last page of a pull (`more: false`) carries `keep`, the ids of the
 * jobs in scope: the phone drops the others (closed outside its window, moved away).
 */
import { QueryTypes, Op as SqlOp, type ModelStatic, type Model } from 'sequelize';
import type { SessionUser } from '../auth/types';
import { db } from '../db';
import { NotFoundError, ValidationError } from '../errors';
import { MAX_PULL_LIMIT_V2, type Change } from '../../sync/protocol';
import { Job } from '../db/models';
import { rawRows, type RawColumn } from '../db/raw';
import { isLead } from '../../roles';
import { seesJob } from '../../rules';
import { APPEND_TABLES, STORED_CHANGE, type AppendTable } from '../db/append-tables';
import { AGGREGATES } from './registry';
import { LIBRARY, scopeOf, visibleWithoutJob, windowsOf, type FeedRow, type Scope } from './scope';
import { Bytes, FEED_COLUMNS, appendWriter, feedChange, feedText, objectChange, pageJson, storedChange, type ChangeText } from './pull-json';

/** How long the change feed keeps its rows; an older cursor gets a snapshot (v2). */
export const FEED_DAYS = Number(process.env.SYNC_FEED_DAYS ?? 90);

export async function lastSeq(workshopId: string): Promise<number> {
	return (await counters(workshopId)).last;
}

async function counters(workshopId: string): Promise<{ last: number; floor: number }> {
	const [row] = await db().query<{ last_seq: number | bigint; floor_seq: number | bigint }>(
		'SELECT last_seq, floor_seq FROM change_counters WHERE workshop_id = ?',
		{ replacements: [workshopId], type: QueryTypes.SELECT }
	);
	return { last: Number(row?.last_seq ?? 0), floor: Number(row?.floor_seq ?? 0) };
}

const ids = (xs: string[]) => xs.map(() => '?').join(', ');

type Source = { rows: FeedRow[]; cut: boolean };
type AppendSource = { rows: ChangeText[]; cut: boolean };

/** At most `limit` rows of `sql` in seq order, read with the driver alone (`rawRows`). */
const select = (sql: string, params: unknown[], limit: number) => rawRows(`${sql} ORDER BY seq LIMIT ?`, [...params, limit]);

/** Rows of an append-only table (`SELECT *`) as changes, in their order. */
function written(entity: string, { rows, columns }: { rows: unknown[][]; columns: RawColumn[] }): ChangeText[] {
	if (!rows.length) return [];
	const write = appendWriter(entity, columns);
	const out = new Bytes(rows.length * 1024);
	const changes = new Array<ChangeText>(rows.length);
	for (let i = 0; i < rows.length; i++) changes[i] = write(rows[i], out);
	return changes;
}

/** Changes in seq order, and whether more rows lie beyond the last of them (`cut`). */
type Rows = { rows: ChangeText[]; cut: boolean };

/**
 * At most `limit` rows of an append-only table of `jobs` matching `rest`, in seq order, as
 * changes; `cut` when more follow. A table that keeps each row's change (`STORED_CHANGE`:
 * readings) is read as those bytes and copied; the rows without them (an OL reading) are
 * read whole and written as any other.
 *
 * A stored table of several jobs is read in two steps. Its `(job_id, seq)` index alone says
 * where the page ends (the seq of its `limit`-th row, if there is one): one query ordering
 * the rows themselves across jobs would read every row after the cursor before keeping
 * `limit` of them — the whole window, page after page, for a lead. Then the page's rows, in
 * two reads at once (every other job each, merged in seq order): the database's time is most
 * of this read.
 */
async function appendRows(entity: string, table: AppendTable, jobs: string[], rest: string, params: unknown[], limit: number): Promise<Rows> {
	const where = (part: string[], upTo: number | null = null) => ({
		sql: `job_id IN (${ids(part)}) AND ${rest}${upTo === null ? '' : ' AND seq <= ?'}`,
		params: [...part, ...params, ...(upTo === null ? [] : [upTo])]
	});
	const stored = STORED_CHANGE[table];
	if (!stored) {
		const w = where(jobs);
		const rows = written(entity, await select(`SELECT * FROM ${table} WHERE ${w.sql}`, w.params, limit));
		return { rows, cut: rows.length === limit };
	}
	if (jobs.length < 2) {
		// One job: the index gives its rows in seq order, `limit` of them read.
		const rows = await storedRows(entity, table, stored, where(jobs), limit);
		return { rows, cut: rows.length === limit };
	}
	const w = where(jobs);
	const [end] = (await rawRows(`SELECT seq FROM ${table} WHERE ${w.sql} ORDER BY seq LIMIT 1 OFFSET ?`, [...w.params, limit - 1])).rows;
	const upTo = end ? Number(end[0]) : null;
	const [a, b] = await Promise.all([0, 1].map((k) => storedRows(entity, table, stored, where(jobs.filter((_j, i) => i % 2 === k), upTo), limit)));
	const rows = merged(a, b, limit);
	return { rows, cut: upTo !== null || rows.length === limit };
}

/** Two lists in seq order as one, at most `limit`. */
function merged(a: ChangeText[], b: ChangeText[], limit: number): ChangeText[] {
	const out: ChangeText[] = [];
	let i = 0;
	let j = 0;
	while (out.length < limit && (i < a.length || j < b.length)) out.push(j >= b.length || (i < a.length && a[i].seq < b[j].seq) ? a[i++] : b[j++]);
	return out;
}

/** At most `limit` rows of a table with a stored change (column `stored`) in seq order: the kept bytes, or the row written for the odd one without. */
async function storedRows(entity: string, table: AppendTable, stored: string, where: { sql: string; params: unknown[] }, limit: number): Promise<ChangeText[]> {
	const { rows } = await select(`SELECT seq, ${stored}, IF(${stored} IS NULL, id, NULL) FROM ${table} WHERE ${where.sql}`, where.params, limit);
	if (!rows.length) return [];
	const out = new Bytes(rows.length * 1024);
	const changes = new Array<ChangeText>(rows.length);
	const missing = new Map<string, number>(); // id → where its change goes
	for (let i = 0; i < rows.length; i++) {
		const r = rows[i];
		if (r[1] == null) missing.set(r[2] as string, i);
		else changes[i] = storedChange(Number(r[0]), r[1] as Buffer, out);
	}
	if (missing.size) {
		const { rows: whole, columns } = await rawRows(`SELECT * FROM ${table} WHERE id IN (${ids([...missing.keys()])})`, [...missing.keys()]);
		const idAt = columns.findIndex((c) => c.name === 'id');
		written(entity, { rows: whole, columns }).forEach((c, k) => (changes[missing.get(whole[k][idAt] as string)!] = c));
	}
	return changes;
}

/** The sources of one page: each read from its index, at most `limit` rows after `cursor`. */
async function readSources(scope: Scope, cursor: number, limit: number): Promise<(Source | AppendSource)[]> {
	const w = scope.workshopId;
	const feed = async (sql: string, params: unknown[], keep: (r: FeedRow) => boolean = () => true): Promise<Source> => {
		const raw = (await select(`SELECT ${FEED_COLUMNS} FROM changes WHERE ${sql}`, params, limit)).rows;
		return { rows: raw.map(feedText).filter(keep), cut: raw.length === limit };
	};
	const reads: Promise<Source | AppendSource>[] = [];
	if (scope.lead) {
		// A lead's feed leaves out only the rows of jobs closed before the window (a deleted
		// job's last upsert and its delete still come, as they always did).
		const inWindow = new Set(scope.jobs);
		reads.push(
			feed('workshop_id = ? AND seq > ? AND (audience IS NULL OR audience = ?)', [w, cursor, scope.userId]).then(async (src) => {
				const others = [...new Set(src.rows.flatMap((r) => (r.jobId && !inWindow.has(r.jobId) ? [r.jobId] : [])))];
				if (!others.length) return src;
				const old = new Set(
					(
						await db().query<{ id: string }>(
							`SELECT id FROM jobs WHERE id IN (${ids(others)}) AND status = 'closed' AND closed_at < UTC_TIMESTAMP(3) - INTERVAL ? DAY`,
							{ replacements: [...others, scope.days], type: QueryTypes.SELECT }
						)
					).map((r) => r.id)
				);
				return { rows: src.rows.filter((r) => !r.jobId || !old.has(r.jobId) || r.op !== 'upsert'), cut: src.cut };
			})
		);
	} else {
		reads.push(feed('workshop_id = ? AND audience = ? AND seq > ?', [w, scope.userId, cursor]));
		if (scope.jobs.length)
			reads.push(feed(`workshop_id = ? AND job_id IN (${ids(scope.jobs)}) AND seq > ? AND audience IS NULL`, [w, ...scope.jobs, cursor]));
		reads.push(
			feed(`workshop_id = ? AND entity IN ('component', 'sheet', 'customer', 'vehicle') AND seq > ? AND audience IS NULL AND job_id IS NULL`, [w, cursor], (r) =>
				visibleWithoutJob(r, scope)
			)
		);
	}
	if (scope.jobs.length) {
		for (const [entity, table] of Object.entries(APPEND_TABLES)) {
			reads.push(
				appendRows(entity, table, scope.jobs, 'seq > ?', [cursor], limit)
			);
		}
	}
	return Promise.all(reads);
}


type Page = { changes: ChangeText[]; cursor: number; more: boolean };

/** One page of the feed after `cursor`, up to `last` (see the header). */
async function feedPage(scope: Scope, cursor: number, last: number, limit: number): Promise<Page> {
	const sources = await readSources(scope, cursor, limit);
	let bound = last;
	for (const s of sources) if (s.cut && s.rows.length) bound = Math.min(bound, s.rows[s.rows.length - 1].seq);
	const rows = (sources as { rows: (FeedRow | ChangeText)[] }[])
		.flatMap((s) => s.rows)
		.filter((r) => r.seq <= bound)
		.sort((a, b) => a.seq - b.seq);
	const page = rows.slice(0, limit);
	if (rows.length > limit) bound = page[page.length - 1].seq;
	const out = new Bytes();
	return { changes: page.map((r) => ('bytes' in r ? r : feedChange(r, out))), cursor: bound, more: bound < last };
}

/** Drop feed rows older than `days` (in batches); a cursor below `floor_seq` then gets a snapshot. */
export async function trimFeed(workshopId: string, days = FEED_DAYS): Promise<number> {
	const [row] = await db().query<{ seq: number | bigint | null }>(
		'SELECT MAX(seq) AS seq FROM changes WHERE workshop_id = ? AND at < UTC_TIMESTAMP(3) - INTERVAL ? DAY',
		{ replacements: [workshopId, days], type: QueryTypes.SELECT }
	);
	const upTo = Number(row?.seq ?? 0);
	if (!upTo) return 0;
	// The floor first: a puller that read the old floor still finds every row it needs.
	await db().query('UPDATE change_counters SET floor_seq = GREATEST(floor_seq, ?) WHERE workshop_id = ?', { replacements: [upTo, workshopId] });
	let removed = 0;
	for (;;) {
		const n = Number(await db().query('DELETE FROM changes WHERE workshop_id = ? AND seq <= ? LIMIT 10000', { replacements: [workshopId, upTo], type: QueryTypes.BULKDELETE }));
		removed += n;
		if (n < 10000) return removed;
	}
}

const trimmedAt = new Map<string, number>();
/** Trim the workshop's feed at most once an hour per process, in the background. */
function trimNow(workshopId: string) {
	const now = Date.now();
	if ((trimmedAt.get(workshopId) ?? 0) > now - 3_600_000) return;
	trimmedAt.set(workshopId, now);
	trimFeed(workshopId).catch((e) => console.error('trimming the change feed failed', e));
}

/** Version 1: the feed from `cursor` (a cursor ahead of the feed or below what it keeps is a 400). */
export async function pullChanges(user: SessionUser, cursor: number, limit: number) {
	const { last, floor } = await counters(user.workshopId);
	if (cursor > last) throw new ValidationError({ cursor: `Ahead of the feed (last is ${last})` }, 'Cursor ahead of the feed');
	if (cursor < floor) throw new ValidationError({ cursor: `Older than the feed keeps (from ${floor})` }, 'Cursor older than the feed');
	trimNow(user.workshopId);
	const page = await feedPage(await scopeOf(user), cursor, last, limit);
	return pageJson(page.changes, { cursor: page.cursor, more: page.more });
}

// ---- version 2: snapshot, then the feed ----

type Step =
	| { kind: 'mutable'; entity: string; model: ModelStatic<Model>; toRecord: (row: never) => Record<string, unknown> }
	| { kind: 'append'; entity: string; table: AppendTable };

/** Every entity of the sync registry, then every append-only table: what a snapshot carries. */
function snapshotSteps(): Step[] {
	const steps: Step[] = [];
	for (const [entity, agg] of Object.entries(AGGREGATES)) {
		const a = agg as unknown as { def: { model: ModelStatic<Model> }; toRecord: (row: never) => Record<string, unknown> };
		steps.push({ kind: 'mutable', entity, model: a.def.model, toRecord: a.toRecord });
	}
	for (const [entity, table] of Object.entries(APPEND_TABLES)) steps.push({ kind: 'append', entity, table });
	return steps;
}

/** The `where` of a mutable entity's rows in scope (null: none of them). */
function mutableWhere(step: Extract<Step, { kind: 'mutable' }>, scope: Scope): Record<string | symbol, unknown> | null {
	const live = { workshopId: scope.workshopId, deletedAt: { [SqlOp.is]: null } };
	const attrs = step.model.getAttributes() as Record<string, unknown>;
	if (step.entity === 'job') return scope.jobs.length ? { ...live, id: { [SqlOp.in]: scope.jobs } } : null;
	if (step.entity === 'customer' || step.entity === 'vehicle') {
		const list = step.entity === 'customer' ? scope.customers : scope.vehicles;
		return list.length ? { ...live, id: { [SqlOp.in]: list } } : null;
	}
	if (step.entity === 'component') return live;
	if (step.entity === 'sheet') return scope.lead ? live : { ...live, state: 'approved' };
	if ('jobId' in attrs) return scope.jobs.length ? { ...live, jobId: { [SqlOp.in]: scope.jobs } } : null;
	return scope.lead ? live : null;
}

type Token = { base: number; step: number; after: string };
const encodeToken = (t: Token) => `${t.base}.${t.step}.${t.after}`;
function decodeToken(s: string, last: number, steps: number): Token {
	const m = /^(\d{1,15})\.(\d{1,3})\.([0-9a-f-]{0,36})$/.exec(s);
	if (!m || Number(m[1]) > last || Number(m[2]) > steps) throw new ValidationError({ snapshot: 'Not a snapshot this server started' }, 'Unknown snapshot');
	return { base: Number(m[1]), step: Number(m[2]), after: m[3] };
}

/** One step's rows from `after`, at most `want` (the step's own order: id, or seq for append-only rows). */
type StepRows = { items: { id: string; change: ChangeText }[]; cut: boolean };
const NONE: StepRows = { items: [], cut: false };

/** One step's rows from `after`, at most `want` (the step's own order: id, or seq for append-only rows); `cut` when more follow. */
async function readStep(s: Step, scope: Scope, base: number, after: string, want: number): Promise<StepRows> {
	if (s.kind === 'mutable') {
		const where = mutableWhere(s, scope);
		if (!where) return NONE;
		const rows = await s.model.findAll({ where: after ? { ...where, id: { ...(where.id as object), [SqlOp.gt]: after } } : where, order: [['id', 'ASC']], limit: want });
		const out = new Bytes();
		const items = rows.map((row) => {
			const id = row.get('id') as string;
			const change: Change = { seq: base || 1, entity: s.entity as Change['entity'], entityId: id, version: Number(row.get('version') ?? 1), op: 'upsert', record: s.toRecord(row as never) };
			return { id, change: objectChange(change, out) };
		});
		return { items, cut: items.length === want };
	}
	if (!scope.jobs.length) return NONE;
	const { rows, cut } = await appendRows(s.entity, s.table, scope.jobs, 'seq > ? AND seq <= ?', [Number(after || 0), base], want);
	return { items: rows.map((change) => ({ id: String(change.seq), change })), cut };
}

/**
 * One snapshot page from `token` (current records with seq ≤ base for the append-only ones).
 * Steps are read a group at a time, the reads of a group at once (one wait instead of one a
 * table): the mutable entities together with the first append-only table, then the current
 * step, and when it ends within the page every append-only table after it. A group's rows
 * are taken in step order until the page is full; what did not fit is read again on the
 * next page.
 */
async function snapshotPage(scope: Scope, token: Token, limit: number, include: (s: Step) => boolean = () => true) {
	const steps = snapshotSteps();
	const changes: ChangeText[] = [];
	let { step, after } = token;
	let ended = false; // the step before ended within this page
	while (step < steps.length && changes.length < limit) {
		const want = limit - changes.length;
		let end = step + 1;
		if (steps[step].kind === 'mutable') {
			while (end < steps.length && steps[end].kind === 'mutable') end++;
			if (end < steps.length) end++; // and the first append-only table (it usually fills the rest)
		} else if (ended && steps[step - 1]?.kind === 'append') end = steps.length;
		const group = steps.slice(step, end);
		const reads = await Promise.all(group.map((s, k) => (include(s) ? readStep(s, scope, token.base, k === 0 ? after : '', want) : Promise.resolve(NONE))));
		for (const { items: got, cut } of reads) {
			const room = limit - changes.length;
			const taken = got.length > room ? got.slice(0, room) : got;
			for (const g of taken) changes.push(g.change);
			// A step is done when nothing of it lies beyond what it gave and all of that fit.
			if (!cut && taken.length === got.length) {
				step++;
				after = '';
				ended = true;
				continue;
			}
			if (taken.length) after = taken[taken.length - 1].id;
			ended = false;
			break;
		}
	}
	return { changes, next: step < steps.length ? encodeToken({ base: token.base, step, after }) : null };
}

/**
 * Version 2 (see the header), as the answer's JSON text: `{ changes, cursor, more, snapshot?,
 * reset?, keep? }`. `snapshot` continues a snapshot this server started.
 */
export async function pullV2(user: SessionUser, cursor: number, limit: number, snapshot?: string): Promise<Buffer> {
	const [{ last, floor }, scope] = await Promise.all([counters(user.workshopId), windowsOf(user.workshopId).then((w) => scopeOf(user, w))]);
	if (cursor > last) throw new ValidationError({ cursor: `Ahead of the feed (last is ${last})` }, 'Cursor ahead of the feed');
	trimNow(user.workshopId);
	const done = (p: Page, extra: { snapshot?: string; reset?: true } = {}) =>
		pageJson(p.changes, { cursor: p.cursor, more: p.more, ...extra, ...(p.more || extra.snapshot ? {} : { keep: scope.jobs }) });
	let token: Token | null = null;
	let reset = false;
	if (snapshot) token = decodeToken(snapshot, last, snapshotSteps().length);
	else if (cursor === 0 || cursor < floor) {
		token = { base: last, step: 0, after: '' };
		reset = true;
	}
	if (!token) return done(await feedPage(scope, cursor, last, limit));
	const page = await snapshotPage(scope, token, limit);
	const r = reset ? { reset: true as const } : {};
	if (page.next) return done({ changes: page.changes, cursor: token.base, more: true }, { snapshot: page.next, ...r });
	return done({ changes: page.changes, cursor: token.base, more: token.base < last }, r);
}

/**
 * GET /api/sync/jobs/:id: one job with everything under it (its customer and vehicle, every
 * record with a job, every append-only record), as changes the phone applies — how a lead's
 * phone opens a job older than its window; the answer's JSON text, `{ changes }`. A job the
 * caller may not see (the rulebook's `seesJob`) is not there for them (404).
 */
export async function jobOnDemand(user: SessionUser, jobId: string): Promise<Buffer> {
	const job = await Job.findOne({ where: { id: jobId, workshopId: user.workshopId, deletedAt: { [SqlOp.is]: null } } });
	if (!job || !seesJob({ role: user.role, userId: user.id }, { assigneeId: job.assigneeId })) throw new NotFoundError();
	const scope: Scope = {
		lead: isLead(user),
		userId: user.id,
		workshopId: user.workshopId,
		days: 0,
		jobs: [job.id],
		customers: job.customerId ? [job.customerId] : [],
		vehicles: job.vehicleId ? [job.vehicleId] : []
	};
	const library = new Set<string>(LIBRARY);
	const steps = snapshotSteps();
	const changes: ChangeText[] = [];
	let token: Token | null = { base: await lastSeq(user.workshopId), step: 0, after: '' };
	while (token) {
		while (token.step < steps.length && library.has(steps[token.step].entity)) token = { ...token, step: token.step + 1, after: '' };
		if (token.step >= steps.length) break;
		const page = await snapshotPage(scope, token, MAX_PULL_LIMIT_V2, (s) => !library.has(s.entity));
		for (const c of page.changes) changes.push(c);
		token = page.next ? decodeToken(page.next, token.base, steps.length) : null;
	}
	return pageJson(changes);
}
