/**
 * The shapes the merge rule works on (DESIGN §5), shared by `merge.ts`, `merge-field.ts`,
 * the in-memory reference server and the real server's sync service. Plain JSON values only.
 */
import type { Entity, Op, PushResult } from './protocol';

/** Who sent a value: the signed-in user, the device, its clock (display only) and the op. */
export type Writer = { deviceId: string; userId: string; deviceTime: string; opId: string };

/**
 * The server's state of one record. Invariants: `version` ≥ 1 and counts value changes
 * (a create is 1, every op that changes a value or deletes adds exactly 1);
 * `fieldVersions[f]` ≤ `version` is the version that last changed field `f`;
 * `fieldWriters[f]` lists, one entry per device, the writers standing behind the current
 * value of `f`: the one who last changed it plus any device that later sent the same value
 * without having seen it. A deleted record is a tombstone (`deleted`), never removed.
 */
export type RecordState = {
	version: number;
	deleted: boolean;
	fields: Record<string, unknown>;
	fieldVersions: Record<string, number>;
	fieldWriters: Record<string, Writer[]>;
};

/** An op as the merge sees it: the pushed op plus the authenticated user and device. */
export type MergeOp = Pick<
	Op,
	'opId' | 'entity' | 'entityId' | 'kind' | 'baseVersion' | 'fields' | 'deviceTime'
> & { deviceId: string; userId: string };

/** A value a device sent that clashes with the record's value, with its writer. */
export type Candidate = Writer & { value: unknown };

/**
 * A kept clash on one field of one record; at most one `open` per record and field.
 * `server` mirrors the record's value and writers (the record keeps that value until the
 * lead settles); `candidates` holds, one per device, the latest clashing value, never equal
 * to `server.value`. A conflict whose candidates all came round to the record's value is
 * `agreed` (closed: nothing left to decide). The pseudo-field `DELETED_FIELD` holds a clash
 * between a delete (value `true`) and changes made since by other devices (value `false`).
 */
export type Conflict = {
	conflictId: string;
	entity: Entity;
	entityId: string;
	field: string;
	status: 'open' | 'agreed';
	server: { value: unknown; writers: Writer[] };
	candidates: Candidate[];
};

/** Pseudo-field of a delete-against-newer-changes conflict (never a real field name). */
export const DELETED_FIELD = '_deleted';

/** One changed value, for the audit log (`old` is null for a create). */
export type FieldChange = { field: string; old: unknown; new: unknown };

/**
 * What one op does. `state` is what to store (the input state when rejected or for a delete
 * that clashed); `changed` the values that changed (for the audit); `feed` the change-feed
 * row to append, if any; `conflicts` the conflicts opened, joined or closed by this op,
 * each in its full new form (upsert by `conflictId`).
 */
export type MergeOutcome = {
	result: PushResult;
	state: RecordState | null;
	changed: FieldChange[];
	feed: 'upsert' | 'delete' | null;
	conflicts: Conflict[];
};

/** The record's open conflicts, and how to make an id for a new one. */
export type MergeContext = {
	openConflicts: readonly Conflict[];
	newConflictId: () => string;
};
