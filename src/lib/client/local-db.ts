/**
 * The phone's copy, in IndexedDB through idb: one database per signed-in user
 * (`fieldbench-<userId>`), so a shared phone never mixes users. All schema changes live in
 * `upgrade()`, one step per version.
 *
 * - `records`: every record the phone holds, keyed `[entity, id]`, with the server version
 *   it is based on, its job (for evictions and scoped lists) and `pending`, the number of
 *   its ops still in the outbox.
 * - `outbox`: ops waiting to send, in the order made (auto-increment key).
 * - `issues`: what needs attention: rejected ops (with the reason), clashes kept for the lead.
 * - `meta`: the pull cursor (and a snapshot's token and mark while one runs), the device id,
 *   the last sync.
 * - `photos` (version 2): photos taken on this phone, the shrunk picture as a blob with its
 *   record and where its upload stands (`client/photos.ts`); kept after sending, so the
 *   phone shows them without signal.
 */
import { openDB, type DBSchema, type IDBPDatabase } from 'idb';
import type { Entity, Op, PushResult } from '../sync/protocol';

export type LocalRecord = {
	entity: Entity;
	id: string;
	/** Server version this copy is based on (0: never reached the server). */
	version: number;
	jobId: string | null;
	data: Record<string, unknown>;
	deleted: boolean;
	pending: number;
	updatedAt: string;
	/** The snapshot that last brought it (swept when a snapshot ends without it). */
	snap?: string;
};
/** `before`: for a patch, the values its fields had on this phone before it (to undo a refusal). */
export type OutboxEntry = { seq?: number; op: Op; jobId: string | null; createdAt: string; before?: Record<string, unknown> };
export type Issue = { opId: string; op: Op; result: PushResult; kind: 'rejected' | 'conflict'; at: string; seen: boolean; before?: Record<string, unknown> };

/** A photo taken on this phone and its upload. */
export type LocalPhoto = {
	id: string;
	jobId: string;
	testId: string | null;
	readingId: string | null;
	caption: string | null;
	blob: Blob;
	type: string;
	bytes: number;
	width: number;
	height: number;
	sha256: string;
	/** `waiting` to send (also after a failure, to be tried again), `sent`, or `refused` by the workshop (kept, with why). */
	state: 'waiting' | 'sent' | 'refused';
	attempts: number;
	/** Why the workshop refused it, in words. */
	problem?: string;
	createdAt: string;
};

export interface FieldbenchDB extends DBSchema {
	photos: { key: string; value: LocalPhoto; indexes: { 'by-job': string; 'by-state': string } };
	records: { key: [string, string]; value: LocalRecord; indexes: { 'by-entity': string; 'by-job': string } };
	outbox: { key: number; value: OutboxEntry };
	issues: { key: string; value: Issue };
	meta: { key: string; value: unknown };
}

export type LocalDb = IDBPDatabase<FieldbenchDB>;
export const DB_VERSION = 2;

/** The database name for a user. */
export const dbNameFor = (userId: string) => `fieldbench-${userId}`;

/** Open (creating or upgrading) the user's database. */
export function openLocalDb(userId: string): Promise<LocalDb> {
	return openDB<FieldbenchDB>(dbNameFor(userId), DB_VERSION, {
		upgrade(db, oldVersion) {
			if (oldVersion < 1) {
				const records = db.createObjectStore('records', { keyPath: ['entity', 'id'] });
				records.createIndex('by-entity', 'entity');
				records.createIndex('by-job', 'jobId');
				db.createObjectStore('outbox', { keyPath: 'seq', autoIncrement: true });
				db.createObjectStore('issues', { keyPath: 'opId' });
				db.createObjectStore('meta');
			}
			if (oldVersion < 2) {
				const photos = db.createObjectStore('photos', { keyPath: 'id' });
				photos.createIndex('by-job', 'jobId');
				photos.createIndex('by-state', 'state');
			}
		}
	});
}

/** Live records of one entity (deleted ones left out). */
export async function listRecords(db: LocalDb, entity: Entity): Promise<LocalRecord[]> {
	const all = await db.getAllFromIndex('records', 'by-entity', entity);
	return all.filter((r) => !r.deleted);
}

/** One live record, or undefined. */
export async function getRecord(db: LocalDb, entity: Entity, id: string): Promise<LocalRecord | undefined> {
	const r = await db.get('records', [entity, id]);
	return r && !r.deleted ? r : undefined;
}

/** Records under one job (tests, readings, spark and swap tests, sign-offs). */
export async function listByJob(db: LocalDb, jobId: string): Promise<LocalRecord[]> {
	return (await db.getAllFromIndex('records', 'by-job', jobId)).filter((r) => !r.deleted);
}

export async function getMeta<T>(db: LocalDb, key: string): Promise<T | undefined> {
	return (await db.get('meta', key)) as T | undefined;
}

export async function setMeta(db: LocalDb, key: string, value: unknown): Promise<void> {
	await db.put('meta', value, key);
}
