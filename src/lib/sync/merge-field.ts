/**
 * The per-field rule of DESIGN §5, applied to a draft of one record and its conflicts.
 * For a field `f` sent with value `v` by device `d` on top of `baseVersion`:
 *  1. `v` equals the record's value: nothing to decide; `d` joins the value's writers and
 *     leaves the candidates of an open conflict (which closes as `agreed` when none remain).
 *  2. `f` unchanged since the base (`fieldVersions[f]` ≤ base), or `d` is the only writer
 *     standing behind the value (a device never conflicts with itself): `v` applies.
 *  3. otherwise `f` was changed since the base by another device: the record keeps its value
 *     and `v` becomes `d`'s candidate in the one open conflict of the record and field.
 * Rule 1 keeps a device's agreement: if its first writer later changes the value, the
 * agreeing device clashes with it, as it would have had it arrived after the change. So, for
 * devices patching from the same pulled version, what is kept per field (each device's last
 * value, on the record or as a candidate) does not depend on arrival order, provided a
 * device sends only the fields it changed (its first value differs from the one it pulled).
 */
import type { Candidate, Conflict, FieldChange, MergeOp, RecordState, Writer } from './merge-types';

/** A record being merged: a private copy, changed in place by `mergeField`. */
export type Draft = {
	state: RecordState;
	/** field → the conflict on it (open ones from the context, plus those made here) */
	conflicts: Map<string, Conflict>;
	/** fields whose conflict was opened, joined or closed by this op */
	touched: Set<string>;
	changed: FieldChange[];
	clashed: string[];
	newConflictId: () => string;
};

/**
 * True when two JSON values are the same: objects compare key by key whatever their key
 * order, and a missing value (`undefined`) equals `null`.
 */
export function isSameValue(a: unknown, b: unknown): boolean {
	return canonicalJson(a) === canonicalJson(b);
}

function canonicalJson(value: unknown): string {
	const sortKeys = (_key: string, v: unknown) =>
		v && typeof v === 'object' && !Array.isArray(v)
			? Object.fromEntries(
					Object.keys(v)
						.sort()
						.map((k) => [k, (v as Record<string, unknown>)[k]])
				)
			: v;
	return JSON.stringify(value, sortKeys) ?? 'null';
}

/** The writer of an op. */
export function writerOf(op: MergeOp): Writer {
	return { deviceId: op.deviceId, userId: op.userId, deviceTime: op.deviceTime, opId: op.opId };
}

const withoutDevice = <T extends Writer>(list: readonly T[], deviceId: string) =>
	list.filter((w) => w.deviceId !== deviceId);

/** Merge one field of a patch into the draft (see the module comment for the rule). */
export function mergeField(
	d: Draft,
	field: string,
	value: unknown,
	op: MergeOp,
	nextVersion: number
) {
	const s = d.state;
	const writer = writerOf(op);
	const writers = s.fieldWriters[field] ?? [];
	const unseen = (s.fieldVersions[field] ?? 0) > op.baseVersion;
	const onlyWriter = writers.length === 1 && writers[0].deviceId === op.deviceId;
	if (isSameValue(s.fields[field], value)) {
		s.fieldWriters[field] = [...withoutDevice(writers, op.deviceId), writer];
		dropCandidate(d, field, op.deviceId);
	} else if (!unseen || onlyWriter) {
		d.changed.push({ field, old: s.fields[field] ?? null, new: value });
		s.fields[field] = value;
		s.fieldVersions[field] = nextVersion;
		s.fieldWriters[field] = [writer];
		dropCandidate(d, field, op.deviceId);
	} else {
		s.fieldWriters[field] = withoutDevice(writers, op.deviceId);
		addCandidate(d, op, field, { ...writer, value });
		d.clashed.push(field);
	}
	reconcileConflict(d, field);
}

function dropCandidate(d: Draft, field: string, deviceId: string) {
	const c = d.conflicts.get(field);
	if (c?.status === 'open')
		d.conflicts.set(field, { ...c, candidates: withoutDevice(c.candidates, deviceId) });
}

/** Join the field's open conflict (replacing the device's earlier candidate) or open one. */
function addCandidate(d: Draft, op: MergeOp, field: string, candidate: Candidate) {
	const open = d.conflicts.get(field);
	const c: Conflict =
		open?.status === 'open'
			? open
			: {
					conflictId: d.newConflictId(),
					entity: op.entity,
					entityId: op.entityId,
					field,
					status: 'open',
					server: { value: null, writers: [] },
					candidates: []
				};
	d.conflicts.set(field, {
		...c,
		candidates: [...withoutDevice(c.candidates, op.deviceId), candidate]
	});
}

/**
 * Restore the conflict's invariants after a change of the field: candidates equal to the
 * record's value stand behind it instead; the server side mirrors the record; a conflict
 * with no candidate left closes as `agreed`.
 */
function reconcileConflict(d: Draft, field: string) {
	const c = d.conflicts.get(field);
	if (c?.status !== 'open') return;
	const value = d.state.fields[field] ?? null;
	const agreeing = c.candidates.filter((k) => isSameValue(k.value, value));
	const candidates = c.candidates.filter((k) => !isSameValue(k.value, value));
	const writers = [...(d.state.fieldWriters[field] ?? [])];
	for (const { value: _v, ...w } of agreeing) writers.push(w);
	d.state.fieldWriters[field] = writers;
	const status = candidates.length ? 'open' : 'agreed';
	d.conflicts.set(field, { ...c, status, candidates, server: { value, writers } });
	d.touched.add(field);
}
