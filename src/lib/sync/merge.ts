/**
 * The server's merge rule (DESIGN §5) as one pure function, `mergeOp`: given a record's state,
 * its open conflicts and one op, it says what to store, what to audit, what to append to the
 * change feed, which conflicts to open or update, and what to answer. The ledger of opIds
 * (duplicates) is the caller's: see `memory-server.ts` for the reference.
 *
 *  - append-only entities accept only `create` (`rejected: append_only`);
 *  - `create` (baseVersion 0) on a missing record writes version 1; on an existing record it
 *    is a no-op `applied` when every sent field equals the stored one, else `id_conflict`;
 *  - `patch` merges field by field (`merge-field.ts`); on a missing or deleted record it is
 *    `not_found`; a baseVersion above the record's version is `base_ahead`;
 *  - `delete` tombstones unless another device changed a field since its base: then the
 *    record is kept and a conflict on `DELETED_FIELD` opens (`conflict`, `stale_delete`);
 *    a delete of a deleted record is a no-op `applied` (it is gone, as asked).
 * Status: `conflict` when any field clashed (the other fields still apply), else `applied`
 * when the base was the current version, else `merged`. The version grows by one exactly
 * when a value changed or the record was deleted.
 */
import { isAppendOnly, type PushResult, type Reason } from './protocol';
import { isSameValue, mergeField, writerOf, type Draft } from './merge-field';
import {
	DELETED_FIELD,
	type Conflict,
	type MergeContext,
	type MergeOp,
	type MergeOutcome,
	type RecordState,
	type Writer
} from './merge-types';

export { isSameValue } from './merge-field';
export * from './merge-types';

/** Merge one op into a record's state; pure (the inputs are never changed). */
export function mergeOp(state: RecordState | null, op: MergeOp, ctx: MergeContext): MergeOutcome {
	if (op.kind !== 'create' && isAppendOnly(op.entity)) return reject(state, op, 'append_only');
	if (op.kind === 'create') return mergeCreate(state, op);
	if (!state || (state.deleted && op.kind === 'patch')) return reject(state, op, 'not_found');
	if (op.baseVersion > state.version) return reject(state, op, 'base_ahead');
	return op.kind === 'patch' ? mergePatch(state, op, ctx) : mergeDelete(state, op, ctx);
}

function reject(state: RecordState | null, op: MergeOp, reason: Reason): MergeOutcome {
	const result: PushResult = { opId: op.opId, status: 'rejected', reason };
	return { result, state, changed: [], feed: null, conflicts: [] };
}

function accept(state: RecordState, op: MergeOp, status: 'applied' | 'merged'): PushResult {
	return { opId: op.opId, status, version: state.version };
}

function mergeCreate(state: RecordState | null, op: MergeOp): MergeOutcome {
	if (op.baseVersion !== 0) return reject(state, op, 'invalid');
	if (state) {
		const same = Object.entries(op.fields).every(([k, v]) => isSameValue(state.fields[k], v));
		if (!same) return reject(state, op, 'id_conflict');
		return { result: accept(state, op, 'applied'), state, changed: [], feed: null, conflicts: [] };
	}
	const fields = structuredClone(op.fields);
	const names = Object.keys(fields).sort();
	const created: RecordState = {
		version: 1,
		deleted: false,
		fields,
		fieldVersions: Object.fromEntries(names.map((f) => [f, 1])),
		fieldWriters: Object.fromEntries(names.map((f) => [f, [writerOf(op)]]))
	};
	const changed = names.map((field) => ({ field, old: null, new: fields[field] }));
	return {
		result: accept(created, op, 'applied'),
		state: created,
		changed,
		feed: 'upsert',
		conflicts: []
	};
}

function openDraft(state: RecordState, ctx: MergeContext): Draft {
	const open = ctx.openConflicts.filter((c) => c.status === 'open');
	return {
		state: structuredClone(state),
		conflicts: new Map(open.map((c) => [c.field, structuredClone(c)])),
		touched: new Set(),
		changed: [],
		clashed: [],
		newConflictId: ctx.newConflictId
	};
}

function touchedConflicts(d: Draft): Conflict[] {
	return [...d.touched].sort().map((f) => d.conflicts.get(f)!);
}

function mergePatch(state: RecordState, op: MergeOp, ctx: MergeContext): MergeOutcome {
	const d = openDraft(state, ctx);
	const nextVersion = state.version + 1;
	for (const field of Object.keys(op.fields).sort()) {
		mergeField(d, field, op.fields[field], op, nextVersion);
	}
	if (d.changed.length) d.state.version = nextVersion;
	const conflicts = touchedConflicts(d);
	const feed = d.changed.length ? 'upsert' : null;
	const outcome = { state: d.state, changed: d.changed, feed, conflicts } as const;
	if (d.clashed.length) {
		const conflictId = d.conflicts.get(d.clashed[0])!.conflictId;
		const result: PushResult = {
			opId: op.opId,
			status: 'conflict',
			version: d.state.version,
			conflictId
		};
		return { result, ...outcome };
	}
	const status = op.baseVersion === state.version ? 'applied' : 'merged';
	return { result: accept(d.state, op, status), ...outcome };
}

/**
 * Whether a delete on top of `base` would discard another device's work, and whose: a field
 * changed since `base` whose writers include another device (or are unknown), or a value of
 * another device waiting in an open conflict of the record.
 */
function findOtherWork(state: RecordState, op: MergeOp, open: readonly Conflict[]) {
	const writers = new Map<string, Writer>();
	let clash = false;
	for (const [field, version] of Object.entries(state.fieldVersions)) {
		if (version <= op.baseVersion) continue;
		const list = state.fieldWriters[field] ?? [];
		if (!list.length) clash = true;
		for (const w of list) if (w.deviceId !== op.deviceId) writers.set(w.deviceId, w);
	}
	const waiting = open.some((c) => c.candidates.some((k) => k.deviceId !== op.deviceId));
	return { clash: clash || waiting || writers.size > 0, writers: [...writers.values()] };
}

function mergeDelete(state: RecordState, op: MergeOp, ctx: MergeContext): MergeOutcome {
	const noChange = { state, changed: [], feed: null, conflicts: [] };
	if (state.deleted) return { result: accept(state, op, 'applied'), ...noChange };
	const open = ctx.openConflicts.filter((c) => c.status === 'open');
	const openDelete = open.find((c) => c.field === DELETED_FIELD);
	const others = findOtherWork(
		state,
		op,
		open.filter((c) => c !== openDelete)
	);
	if (op.baseVersion < state.version && others.clash) {
		const conflict = joinDeleteConflict(op, openDelete, others.writers, ctx);
		const { conflictId } = conflict;
		const result: PushResult = {
			opId: op.opId,
			status: 'conflict',
			version: state.version,
			conflictId,
			reason: 'stale_delete'
		};
		return { result, ...noChange, conflicts: [conflict] };
	}
	const deleted = { ...structuredClone(state), version: state.version + 1, deleted: true };
	const status = op.baseVersion === state.version ? 'applied' : 'merged';
	const conflicts = openDelete ? [{ ...openDelete, status: 'agreed' as const }] : [];
	const result = accept(deleted, op, status);
	return { result, state: deleted, changed: [], feed: 'delete', conflicts };
}

/** The record's delete conflict with this op's delete as a candidate (opened if none is). */
function joinDeleteConflict(
	op: MergeOp,
	open: Conflict | undefined,
	writers: Writer[],
	ctx: MergeContext
): Conflict {
	return {
		conflictId: open?.conflictId ?? ctx.newConflictId(),
		entity: op.entity,
		entityId: op.entityId,
		field: DELETED_FIELD,
		status: 'open',
		server: { value: false, writers: mergeWriters(open?.server.writers ?? [], writers) },
		candidates: [
			...(open?.candidates ?? []).filter((c) => c.deviceId !== op.deviceId),
			{ ...writerOf(op), value: true }
		]
	};
}

function mergeWriters(a: readonly Writer[], b: readonly Writer[]): Writer[] {
	const byDevice = new Map(a.map((w) => [w.deviceId, w]));
	for (const w of b) byDevice.set(w.deviceId, w);
	return [...byDevice.values()];
}
