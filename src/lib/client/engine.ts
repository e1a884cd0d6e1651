/**
 * The sync client: push the outbox in order, then pull the change feed.
 *
 * Push: the oldest ops in batches; each answer removes its entry. `applied`, `merged` and
 * `duplicate` are done; `conflict` is kept as an issue (the lead settles it); `rejected` is
 * kept as an issue with its reason and never blocks the queue — except `server_error`,
 * which is transient. A transient failure (no network, 5xx, 429, `server_error`, an answer
 * cut off) stops the push with that entry still at the head (a 429's Retry-After is passed
 * on in the report, for the runner to wait that long); a 401 pauses until the user signs in again and
 * never drops anything; a 413 halves the batch.
 * Pull (version 2, see `server/sync/pull.ts`): from the stored cursor until `more` is false;
 * a first sync or a cursor older than the feed keeps is answered with a snapshot, after
 * which what it did not bring is swept; upserts keep local unsent fields on top; `evict`
 * removes a job and everything under it, and so does a job missing from the last page's
 * `keep`. Nothing with an op still in the outbox is ever dropped. Then the clashes the lead
 * has settled since are dropped from what needs attention.
 * One tab at a time (navigator.locks, when there is one). Never awaits the network inside
 * an IndexedDB transaction.
 */
import { getMeta, setMeta, type LocalDb, type LocalRecord, type OutboxEntry } from './local-db';
import { countOutbox, peekOutbox } from './outbox';
import { PHONE_PULL_LIMIT, PUSH_BATCH, type Change, type PullResponse, type PushResult } from '../sync/protocol';

export type SyncState = 'idle' | 'syncing' | 'offline' | 'signed_out' | 'error';
/**
 * Why a sync stopped, as a code (the screens say it in words, see `sync-words.ts`): no
 * connection, the server busy or failing (5xx, 429), an op the server could not store, the
 * pull's cursor refused twice, signed out, or something unexpected.
 */
export type SyncProblem = 'no_connection' | 'server_busy' | 'server_error' | 'store_failed' | 'pull_refused' | 'signed_out' | 'unexpected';
export type SyncReport = {
	state: SyncState;
	pushed: number;
	pulled: number;
	waiting: number;
	issues: number;
	error?: SyncProblem;
	/** The server asked to wait this long before trying again (a 429's Retry-After). */
	retryAfterMs?: number;
};
type Fetch = (input: string, init?: RequestInit) => Promise<Response>;

const CURSOR = 'cursor';

class Problem extends Error {
	constructor(readonly code: SyncProblem) {
		super(code);
	}
}
class Transient extends Problem {
	constructor(
		code: SyncProblem,
		readonly retryAfterMs?: number
	) {
		super(code);
	}
}
class SignedOut extends Problem {}

/** A Retry-After header (seconds, or an HTTP date) in milliseconds from `now`; undefined when absent or unreadable. */
export function retryAfterMs(header: string | null, now = Date.now()): number | undefined {
	if (!header) return undefined;
	const value = header.trim();
	if (/^\d+$/.test(value)) return Number(value) * 1000;
	const at = Date.parse(value);
	return Number.isNaN(at) ? undefined : Math.max(0, at - now);
}

export class SyncEngine {
	batch = PUSH_BATCH;
	constructor(
		private db: LocalDb,
		private deviceId: string,
		private fetcher: Fetch = (i, o) => fetch(i, o)
	) {}

	/** One full round: push everything it can, then pull. */
	async syncOnce(): Promise<SyncReport> {
		let pushed = 0;
		let pulled = 0;
		try {
			pushed = await this.pushAll();
			pulled = await this.pullAll();
			await this.forgetSettledClashes();
			await setMeta(this.db, 'lastSyncAt', new Date().toISOString());
			return { state: 'idle', pushed, pulled, ...(await this.counts()) };
		} catch (e) {
			const state: SyncState = e instanceof SignedOut ? 'signed_out' : e instanceof Transient ? 'offline' : 'error';
			if (state === 'error') console.error('sync failed', e);
			const retryAfterMs = e instanceof Transient ? e.retryAfterMs : undefined;
			return { state, pushed, pulled, ...(await this.counts()), error: e instanceof Problem ? e.code : 'unexpected', ...(retryAfterMs !== undefined ? { retryAfterMs } : {}) };
		}
	}

	async counts() {
		return { waiting: await countOutbox(this.db), issues: await this.db.count('issues') };
	}

	private async call(url: string, init?: RequestInit): Promise<Response> {
		let r: Response;
		try {
			r = await this.fetcher(url, { credentials: 'same-origin', ...init });
		} catch {
			throw new Transient('no_connection');
		}
		if (r.status === 401) throw new SignedOut('signed_out');
		if (r.status === 429) throw new Transient('server_busy', retryAfterMs(r.headers.get('retry-after')));
		if (r.status >= 500) throw new Transient(r.status === 503 ? 'server_busy' : 'server_error');
		return r;
	}

	/** An answer's JSON body; one cut off on the way (the server died mid-answer) is transient. */
	private async body<T>(r: Response): Promise<T> {
		try {
			return (await r.json()) as T;
		} catch {
			throw new Transient('no_connection');
		}
	}

	/** Push until the outbox is empty or a transient failure stops it. */
	async pushAll(): Promise<number> {
		let sent = 0;
		for (;;) {
			const entries = await peekOutbox(this.db, this.batch);
			if (!entries.length) return sent;
			const r = await this.call('/api/sync/push', {
				method: 'POST',
				headers: { 'content-type': 'application/json' },
				body: JSON.stringify({ deviceId: this.deviceId, ops: entries.map((e) => e.op) })
			});
			if (r.status === 413 && this.batch > 1) {
				this.batch = Math.max(1, Math.floor(this.batch / 2));
				continue;
			}
			if (r.status === 400) {
				// The server names the first bad op: keep it as an issue so it never jams the queue.
				const body = await r.json().catch(() => ({}));
				const field = Object.keys(body?.error?.fields ?? {})[0] ?? 'ops.0';
				const index = Number(field.split('.')[1] ?? 0) || 0;
				const bad = entries[Math.min(index, entries.length - 1)];
				await this.settleEntry(bad, { opId: bad.op.opId, status: 'rejected', reason: 'invalid', message: body?.error?.message });
				continue;
			}
			if (!r.ok) throw new Transient('server_error');
			const { results } = await this.body<{ results: PushResult[] }>(r);
			for (let i = 0; i < results.length; i++) {
				const result = results[i];
				if (result.status === 'rejected' && result.reason === 'server_error') throw new Transient('store_failed');
				await this.settleEntry(entries[i], result);
				sent++;
			}
		}
	}

	/** Remove one answered entry and update its record, in one transaction. */
	private async settleEntry(entry: OutboxEntry, result: PushResult) {
		const { op, before } = entry;
		const tx = this.db.transaction(['outbox', 'records', 'issues'], 'readwrite');
		const records = tx.objectStore('records');
		const rec = await records.get([op.entity, op.entityId]);
		const status = result.status === 'duplicate' ? result.firstStatus : result.status;
		if (rec) {
			rec.pending = Math.max(0, rec.pending - 1);
			if (result.version != null && status !== 'rejected') rec.version = Math.max(rec.version, result.version);
			await records.put(rec);
		}
		if (status === 'rejected' || status === 'conflict') {
			const kind = status === 'rejected' ? 'rejected' : 'conflict';
			await tx.objectStore('issues').put({ opId: op.opId, op, result, kind, at: new Date().toISOString(), seen: false, ...(before ? { before } : {}) });
		}
		await tx.objectStore('outbox').delete(entry.seq!);
		await tx.done;
	}

	/**
	 * Drop the clashes the lead has settled from what needs attention (the settled value
	 * itself arrives with the pull). Asked only when some are kept; an answer without the
	 * list changes nothing.
	 */
	async forgetSettledClashes(): Promise<void> {
		const clashes = (await this.db.getAll('issues')).filter((i) => i.kind === 'conflict' && i.result.conflictId);
		if (!clashes.length) return;
		const ids = [...new Set(clashes.map((i) => i.result.conflictId!))].slice(0, 100);
		const r = await this.call(`/api/conflicts/open?ids=${ids.join(',')}`);
		if (!r.ok) return;
		const open = ((await r.json().catch(() => ({}))) as { open?: unknown }).open;
		if (!Array.isArray(open)) return;
		const tx = this.db.transaction('issues', 'readwrite');
		for (const i of clashes) if (ids.includes(i.result.conflictId!) && !open.includes(i.result.conflictId)) await tx.store.delete(i.opId);
		await tx.done;
	}

	/**
	 * Pull pages until the feed has no more (version 2). A snapshot (first sync, or a cursor
	 * older than the feed keeps) is paged with its token, kept beside the cursor so a
	 * dropped connection resumes it; the records it brings are marked, and when it ends the
	 * records it did not bring are swept (never one with ops still waiting to send). The last
	 * page's `keep` drops the jobs no longer in scope (closed outside the window, moved away).
	 */
	async pullAll(): Promise<number> {
		let count = 0;
		for (let page = 0; page < 10_000; page++) {
			const cursor = (await getMeta<number>(this.db, CURSOR)) ?? 0;
			const snapshot = await getMeta<string>(this.db, SNAPSHOT);
			const r = await this.call(`/api/sync/pull?v=2&cursor=${cursor}&limit=${PHONE_PULL_LIMIT}${snapshot ? `&snapshot=${encodeURIComponent(snapshot)}` : ''}`);
			if (r.status === 400) {
				// The feed does not know this cursor (e.g. another database): start again.
				await setMeta(this.db, CURSOR, 0);
				await this.db.delete('meta', SNAPSHOT);
				if (cursor === 0 && !snapshot) throw new Problem('pull_refused');
				continue;
			}
			if (!r.ok) throw new Transient('server_error');
			const body = await this.body<PullResponse>(r);
			const mark = body.reset ? `${cursor}:${Date.now()}` : await getMeta<string>(this.db, MARK);
			const inSnapshot = Boolean(body.reset || snapshot);
			await applyChanges(this.db, body.changes, body.cursor, { snapshot: body.snapshot ?? null, mark: inSnapshot ? mark : undefined });
			if (inSnapshot && !body.snapshot) await sweepUnmarked(this.db, mark!);
			if (body.keep) await keepOnly(this.db, body.keep);
			count += body.changes.length;
			if (!body.more) return count;
		}
		return count;
	}
}

const SNAPSHOT = 'snapshot';
const MARK = 'snapshotMark';

/** Whether a local record may be dropped: it reached the server and has nothing waiting to send. */
const settled = (r: LocalRecord) => r.pending === 0 && r.version > 0;

/** After a snapshot: drop what it did not bring (deleted or out of scope since the phone last synced). */
export async function sweepUnmarked(db: LocalDb, mark: string): Promise<number> {
	const tx = db.transaction(['records', 'outbox', 'meta'], 'readwrite');
	const waiting = new Set((await tx.objectStore('outbox').getAll()).map((e) => `${e.op.entity}:${e.op.entityId}`));
	let dropped = 0;
	let c = await tx.objectStore('records').openCursor();
	while (c) {
		const r = c.value;
		if (r.snap !== mark && settled(r) && !waiting.has(`${r.entity}:${r.id}`)) {
			await c.delete();
			dropped++;
		}
		c = await c.continue();
	}
	await tx.objectStore('meta').delete(MARK);
	await tx.done;
	return dropped;
}

/** Drop the jobs not in `keep` and everything under them (records with waiting ops stay). */
export async function keepOnly(db: LocalDb, keep: string[]): Promise<number> {
	const ids = new Set(keep);
	const tx = db.transaction(['records', 'outbox'], 'readwrite');
	const records = tx.objectStore('records');
	const waiting = new Set((await tx.objectStore('outbox').getAll()).flatMap((e) => [e.jobId, e.op.entityId]));
	let dropped = 0;
	for (const job of await records.index('by-entity').getAll('job')) {
		if (ids.has(job.id) || !settled(job) || waiting.has(job.id)) continue;
		await records.delete(['job', job.id]);
		for (const r of await records.index('by-job').getAll(job.id)) {
			if (r.pending > 0 || waiting.has(r.id)) continue;
			await records.delete([r.entity, r.id]);
		}
		dropped++;
	}
	await tx.done;
	return dropped;
}

const jobOf = (c: Change): string | null =>
	c.entity === 'job' ? c.entityId : ((c.record?.jobId as string | undefined) ?? null);

/**
 * Apply pulled changes and the new cursor in one transaction; during a snapshot also its
 * next token and the mark of every record it brings. `cursor` null leaves the cursor alone
 * (a job fetched on demand).
 */
export async function applyChanges(
	db: LocalDb,
	changes: Change[],
	cursor: number | null,
	o: { snapshot?: string | null; mark?: string } = {}
): Promise<void> {
	const tx = db.transaction(['records', 'outbox', 'meta'], 'readwrite');
	const records = tx.objectStore('records');
	const pendingOps = changes.length ? await tx.objectStore('outbox').getAll() : [];
	for (const c of changes) {
		const key: [string, string] = [c.entity, c.entityId];
		if (c.op === 'evict') {
			await records.delete(key);
			for (const k of await records.index('by-job').getAllKeys(c.entityId)) await records.delete(k);
			continue;
		}
		const local = await records.get(key);
		if (local && local.version > c.version) {
			// already newer here; a snapshot still counts it as brought
			if (o.mark && local.snap !== o.mark) await records.put({ ...local, snap: o.mark });
			continue;
		}
		const mine = pendingOps.filter((e) => e.op.entity === c.entity && e.op.entityId === c.entityId);
		const data = { ...(c.record ?? local?.data ?? {}) };
		for (const e of mine) Object.assign(data, e.op.fields); // unsent local edits stay on top
		const rec: LocalRecord = {
			entity: c.entity,
			id: c.entityId,
			version: c.version,
			jobId: jobOf(c) ?? local?.jobId ?? null,
			data,
			deleted: c.op === 'delete' || Boolean(c.record?.deleted),
			pending: mine.length,
			updatedAt: new Date().toISOString(),
			...(o.mark ? { snap: o.mark } : local?.snap ? { snap: local.snap } : {})
		};
		await records.put(rec);
	}
	const meta = tx.objectStore('meta');
	if (cursor !== null) await meta.put(cursor, CURSOR);
	if (o.snapshot) await meta.put(o.snapshot, SNAPSHOT);
	else if (o.snapshot === null) await meta.delete(SNAPSHOT);
	if (o.mark) await meta.put(o.mark, MARK);
	await tx.done;
}

/** Delay before retry number `attempt` (0-based): exponential, capped, with full jitter. */
export function backoffMs(attempt: number, random = Math.random): number {
	const cap = Math.min(5 * 60_000, 1000 * 2 ** attempt);
	return Math.round(cap / 2 + (random() * cap) / 2);
}

/**
 * A job the phone does not keep (older than its window), fetched with signal and put in
 * IndexedDB so its page opens; the next sync drops it again. False when it could not be had
 * (offline, not the caller's, gone).
 */
export async function fetchJobOnDemand(db: LocalDb, jobId: string, fetcher: Fetch = (i, o) => fetch(i, o)): Promise<boolean> {
	try {
		const r = await fetcher(`/api/sync/jobs/${encodeURIComponent(jobId)}`, { credentials: 'same-origin' });
		if (!r.ok) return false;
		const body = (await r.json()) as { changes?: Change[] };
		if (!Array.isArray(body.changes) || !body.changes.length) return false;
		await applyChanges(db, body.changes, null);
		return true;
	} catch {
		return false;
	}
}
