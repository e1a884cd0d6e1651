/** Builders for sync tests: invented devices, deterministic UUIDv7 ids, ops and records. */
import {
	mergeOp,
	type Conflict,
	type MergeOp,
	type MergeOutcome,
	type RecordState
} from '$lib/sync/merge';
import type { Entity, Op, OpKind } from '$lib/sync/protocol';

/** A deterministic UUIDv7 (version nibble 7, RFC variant) numbered `n` in namespace `ns`. */
export function uuid7(n: number, ns = 1): string {
	const hex = (v: number, width: number) => v.toString(16).padStart(width, '0');
	return `0190${hex(ns, 4)}-0000-7000-8000-${hex(n, 12)}`;
}

/** A UUIDv4 (random-style, not made by a device of ours). */
export const UUID_V4 = '3f2b6c1e-9a4d-4e2f-8b1a-6c5d4e3f2a1b';

export type Device = { deviceId: string; userId: string };
export const PHONE_A: Device = { deviceId: 'phone-a', userId: 'tech-ana' };
export const PHONE_B: Device = { deviceId: 'phone-b', userId: 'tech-bo' };
export const PHONE_C: Device = { deviceId: 'phone-c', userId: 'apprentice-cy' };
export const OFFICE: Device = { deviceId: 'office-desk', userId: 'lead-dee' };

export const JOB_ID = uuid7(1, 2);
export const DEVICE_TIME = '2031-03-04T09:15:00.000Z';

let opCounter = 0;

/** A fresh op; defaults: a patch of the job at baseVersion 1. */
export function makeOp(over: Partial<Op> = {}): Op {
	return {
		opId: uuid7(++opCounter, 3),
		entity: 'job',
		entityId: JOB_ID,
		kind: 'patch',
		baseVersion: 1,
		fields: {},
		deviceTime: DEVICE_TIME,
		...over
	};
}

/** An op as the merge sees it, sent by `device`. */
export function opBy(
	device: Device,
	kind: OpKind,
	fields: Record<string, unknown>,
	baseVersion = kind === 'create' ? 0 : 1,
	over: Partial<Op> = {}
): MergeOp {
	return { ...makeOp({ kind, fields, baseVersion, ...over }), ...device };
}

/** Run `mergeOp` with numbered conflict ids. */
export function merge(
	state: RecordState | null,
	op: MergeOp,
	openConflicts: readonly Conflict[] = []
): MergeOutcome {
	let n = 900;
	return mergeOp(state, op, { openConflicts, newConflictId: () => uuid7(++n, 9) });
}

export const JOB_FIELDS = { complaint: 'Misfire under load', status: 'open', location: 'Bay 2' };

/** The job as created by the office at version 1. */
export function createdJob(entity: Entity = 'job'): RecordState {
	return merge(null, opBy(OFFICE, 'create', JOB_FIELDS, 0, { entity })).state!;
}
