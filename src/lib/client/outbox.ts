/**
 * Every local write: the record and its outbox entry in ONE IndexedDB transaction, so the
 * phone never holds a change it will not send, nor sends one it does not hold.
 */
import { v7 as uuidv7 } from 'uuid';
import { isAppendOnly, type Entity, type Op } from '../sync/protocol';
import type { LocalDb, LocalRecord, OutboxEntry } from './local-db';

export type LocalWrite = {
	entity: Entity;
	id?: string;
	kind: Op['kind'];
	fields?: Record<string, unknown>;
	/** The job the record belongs to (for lists and evictions); a job is its own. */
	jobId?: string | null;
};

/** Apply a write locally and queue its op; returns the record as now stored. */
export async function writeLocal(db: LocalDb, w: LocalWrite, now = new Date()): Promise<LocalRecord> {
	const id = w.id ?? uuidv7();
	const tx = db.transaction(['records', 'outbox'], 'readwrite');
	const records = tx.objectStore('records');
	const existing = await records.get([w.entity, id]);
	if (w.kind !== 'create' && !existing) throw new Error(`No local ${w.entity} ${id}`);
	if (w.kind !== 'create' && isAppendOnly(w.entity)) throw new Error(`${w.entity} is append-only`);
	// A plain copy: screens pass reactive state, which IndexedDB cannot clone.
	const fields = JSON.parse(JSON.stringify(w.fields ?? {})) as Record<string, unknown>;
	const record: LocalRecord = {
		entity: w.entity,
		id,
		version: existing?.version ?? 0,
		jobId: w.jobId ?? existing?.jobId ?? (w.entity === 'job' ? id : null),
		data: { ...(existing?.data ?? {}), ...fields },
		deleted: w.kind === 'delete',
		pending: (existing?.pending ?? 0) + 1,
		updatedAt: now.toISOString()
	};
	const op: Op = {
		opId: uuidv7(),
		entity: w.entity,
		entityId: id,
		kind: w.kind,
		baseVersion: w.kind === 'create' ? 0 : (existing?.version ?? 0),
		fields: w.kind === 'delete' ? {} : fields,
		deviceTime: now.toISOString()
	};
	const entry: OutboxEntry = { op, jobId: record.jobId, createdAt: now.toISOString() };
	if (w.kind === 'patch')
		entry.before = Object.fromEntries(Object.keys(fields).map((k) => [k, existing?.data[k] ?? null]));
	await Promise.all([records.put(record), tx.objectStore('outbox').add(entry), tx.done]);
	return record;
}

/** The oldest `limit` entries, in order. */
export async function peekOutbox(db: LocalDb, limit: number): Promise<OutboxEntry[]> {
	const out: OutboxEntry[] = [];
	let cursor = await db.transaction('outbox').store.openCursor();
	while (cursor && out.length < limit) {
		out.push(cursor.value);
		cursor = await cursor.continue();
	}
	return out;
}

export async function countOutbox(db: LocalDb): Promise<number> {
	return db.count('outbox');
}

/** Everything waiting to send, oldest first. */
export async function listOutbox(db: LocalDb): Promise<OutboxEntry[]> {
	return db.getAll('outbox');
}
