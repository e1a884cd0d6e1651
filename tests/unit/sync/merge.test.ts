import { describe, expect, it } from 'vitest';
import { DELETED_FIELD, isSameValue, type RecordState } from '$lib/sync/merge';
import {
	JOB_FIELDS,
	OFFICE,
	PHONE_A,
	PHONE_B,
	PHONE_C,
	createdJob,
	merge,
	opBy,
	uuid7
} from './fixtures';

const READING = { testId: uuid7(40), value: 0.62, unit: 'Ω' };

/** The job after phone A changed `status` on top of version 1 (now version 2). */
function jobChangedByA(): RecordState {
	return merge(createdJob(), opBy(PHONE_A, 'patch', { status: 'testing' })).state!;
}

describe('create', () => {
	it('writes a missing record at version 1 with every field at version 1', () => {
		const s = createdJob();
		expect([s.version, s.deleted, s.fields, s.fieldVersions.status]).toEqual([
			1,
			false,
			JOB_FIELDS,
			1
		]);
	});

	it('answers applied with version 1 and an upsert for the feed', () => {
		const out = merge(null, opBy(OFFICE, 'create', JOB_FIELDS));
		expect([out.result.status, out.result.version, out.feed]).toEqual(['applied', 1, 'upsert']);
	});

	it('records the creating device as the writer of every field', () => {
		expect(createdJob().fieldWriters.complaint.map((w) => w.deviceId)).toEqual([OFFICE.deviceId]);
	});

	it('audits every created field with no old value', () => {
		const out = merge(null, opBy(OFFICE, 'create', { status: 'open' }));
		expect(out.changed).toEqual([{ field: 'status', old: null, new: 'open' }]);
	});

	it('is a no-op applied when the record exists with the same fields', () => {
		const state = createdJob();
		const out = merge(state, opBy(PHONE_A, 'create', { ...JOB_FIELDS }));
		expect([out.result.status, out.result.version, out.state, out.feed]).toEqual([
			'applied',
			1,
			state,
			null
		]);
	});

	it('rejects id_conflict when the record exists with other fields', () => {
		const state = createdJob();
		const out = merge(state, opBy(PHONE_A, 'create', { ...JOB_FIELDS, location: 'Driveway' }));
		expect([out.result.status, out.result.reason, out.state]).toEqual([
			'rejected',
			'id_conflict',
			state
		]);
	});

	it('rejects a create whose baseVersion is not 0 as invalid', () => {
		expect(merge(null, opBy(PHONE_A, 'create', JOB_FIELDS, 2)).result.reason).toBe('invalid');
	});

	it('creates a record of an append-only entity', () => {
		const out = merge(null, opBy(PHONE_A, 'create', READING, 0, { entity: 'reading' }));
		expect([out.result.status, out.state?.fields]).toEqual(['applied', READING]);
	});
});

describe('append-only entities', () => {
	it.each(['patch', 'delete'] as const)('reject a %s as append_only', (kind) => {
		const reading = createdJob('reading');
		const out = merge(reading, opBy(PHONE_A, kind, { value: 9 }, 1, { entity: 'reading' }));
		expect([out.result.status, out.result.reason, out.state]).toEqual([
			'rejected',
			'append_only',
			reading
		]);
	});
});

describe('patch', () => {
	it('rejects not_found when the record is missing', () => {
		expect(merge(null, opBy(PHONE_A, 'patch', { status: 'testing' })).result.reason).toBe(
			'not_found'
		);
	});

	it('rejects not_found when the record is deleted', () => {
		const deleted = merge(createdJob(), opBy(OFFICE, 'delete', {})).state!;
		expect(merge(deleted, opBy(PHONE_A, 'patch', { status: 'testing' }, 2)).result.reason).toBe(
			'not_found'
		);
	});

	it('rejects base_ahead when the baseVersion is newer than the record', () => {
		expect(merge(createdJob(), opBy(PHONE_A, 'patch', { status: 'x' }, 2)).result.reason).toBe(
			'base_ahead'
		);
	});

	it('applies on the current version, bumping the version and the field version', () => {
		const out = merge(createdJob(), opBy(PHONE_A, 'patch', { status: 'testing' }));
		const s = out.state!;
		expect([
			out.result.status,
			out.result.version,
			s.version,
			s.fieldVersions.status,
			s.fields.status
		]).toEqual(['applied', 2, 2, 2, 'testing']);
	});

	it('audits the old and new value of a changed field', () => {
		const out = merge(createdJob(), opBy(PHONE_A, 'patch', { status: 'testing' }));
		expect(out.changed).toEqual([{ field: 'status', old: 'open', new: 'testing' }]);
	});

	it('merges a field another device has not changed since the base', () => {
		const out = merge(jobChangedByA(), opBy(PHONE_B, 'patch', { location: 'Driveway' }));
		expect([out.result.status, out.state!.fields.location, out.state!.fields.status]).toEqual([
			'merged',
			'Driveway',
			'testing'
		]);
	});

	it('lets a device overwrite its own newer change (no conflict with itself)', () => {
		const out = merge(jobChangedByA(), opBy(PHONE_A, 'patch', { status: 'awaiting parts' }));
		expect([out.result.status, out.state!.fields.status, out.conflicts]).toEqual([
			'merged',
			'awaiting parts',
			[]
		]);
	});

	it('opens a conflict when another device changed the field since the base', () => {
		const out = merge(jobChangedByA(), opBy(PHONE_B, 'patch', { status: 'no fault found' }));
		expect([out.result.status, out.result.conflictId, out.conflicts.length]).toEqual([
			'conflict',
			out.conflicts[0]?.conflictId,
			1
		]);
	});

	it('keeps the server value in the record when a field conflicts', () => {
		const out = merge(jobChangedByA(), opBy(PHONE_B, 'patch', { status: 'no fault found' }));
		expect(out.state!.fields.status).toBe('testing');
	});

	it('keeps both values, writers, devices and times in the conflict', () => {
		const op = opBy(PHONE_B, 'patch', { status: 'no fault found' }, 1, {
			deviceTime: '2031-03-04T11:00:00Z'
		});
		const c = merge(jobChangedByA(), op).conflicts[0];
		expect({
			field: c.field,
			server: c.server.value,
			by: c.server.writers.map((w) => w.userId)
		}).toEqual({
			field: 'status',
			server: 'testing',
			by: [PHONE_A.userId]
		});
		expect(c.candidates).toEqual([
			{ ...PHONE_B, deviceTime: op.deviceTime, opId: op.opId, value: 'no fault found' }
		]);
	});

	it('still applies the other fields of a patch that conflicts', () => {
		const out = merge(
			jobChangedByA(),
			opBy(PHONE_B, 'patch', { status: 'closed', location: 'Bay 4' })
		);
		expect([out.result.status, out.state!.fields.location, out.result.version]).toEqual([
			'conflict',
			'Bay 4',
			3
		]);
	});

	it('decides nothing when the device sends the value the record already has', () => {
		const out = merge(jobChangedByA(), opBy(PHONE_B, 'patch', { status: 'testing' }));
		expect([out.result.status, out.result.version, out.conflicts, out.feed]).toEqual([
			'merged',
			2,
			[],
			null
		]);
	});

	it('keeps the version when nothing changed', () => {
		const out = merge(createdJob(), opBy(PHONE_A, 'patch', { status: 'open' }));
		expect([out.result.status, out.state!.version, out.changed]).toEqual(['applied', 1, []]);
	});

	it('joins a second clash on the same field to the open conflict', () => {
		const first = merge(jobChangedByA(), opBy(PHONE_B, 'patch', { status: 'closed' }));
		const second = merge(
			first.state,
			opBy(PHONE_C, 'patch', { status: 'repaired' }),
			first.conflicts
		);
		expect([second.result.conflictId, second.conflicts[0].candidates.map((c) => c.value)]).toEqual([
			first.result.conflictId,
			['closed', 'repaired']
		]);
	});

	it('keeps one candidate per device, its latest value', () => {
		const first = merge(jobChangedByA(), opBy(PHONE_B, 'patch', { status: 'closed' }));
		const again = merge(
			first.state,
			opBy(PHONE_B, 'patch', { status: 'repaired' }),
			first.conflicts
		);
		expect(again.conflicts[0].candidates.map((c) => [c.deviceId, c.value])).toEqual([
			[PHONE_B.deviceId, 'repaired']
		]);
	});

	it('closes the conflict as agreed when the clashing device comes round to the record value', () => {
		const first = merge(jobChangedByA(), opBy(PHONE_B, 'patch', { status: 'closed' }));
		const back = merge(first.state, opBy(PHONE_B, 'patch', { status: 'testing' }), first.conflicts);
		expect([back.result.status, back.conflicts[0].status, back.conflicts[0].candidates]).toEqual([
			'merged',
			'agreed',
			[]
		]);
	});

	it('updates the conflict when its only writer changes the record value', () => {
		const first = merge(jobChangedByA(), opBy(PHONE_B, 'patch', { status: 'closed' }));
		const next = merge(
			first.state,
			opBy(PHONE_A, 'patch', { status: 'repaired' }),
			first.conflicts
		);
		expect([
			next.state!.fields.status,
			next.conflicts[0].server.value,
			next.conflicts[0].status
		]).toEqual(['repaired', 'repaired', 'open']);
	});

	it('closes the conflict when the record value moves to the candidate value', () => {
		const first = merge(jobChangedByA(), opBy(PHONE_B, 'patch', { status: 'closed' }));
		const next = merge(first.state, opBy(PHONE_A, 'patch', { status: 'closed' }), first.conflicts);
		expect([
			next.conflicts[0].status,
			next.state!.fieldWriters.status.map((w) => w.deviceId)
		]).toEqual(['agreed', [PHONE_A.deviceId, PHONE_B.deviceId]]);
	});

	it('makes a device that agreed with a value clash when its first writer changes it again', () => {
		const agreed = merge(jobChangedByA(), opBy(PHONE_B, 'patch', { status: 'testing' })).state!;
		const out = merge(agreed, opBy(PHONE_A, 'patch', { status: 'closed' }));
		expect([
			out.result.status,
			out.state!.fields.status,
			out.conflicts[0].server.writers[0].deviceId
		]).toEqual(['conflict', 'testing', PHONE_B.deviceId]);
	});

	it('applies a change from a device that saw the latest version, keeping the open conflict', () => {
		const first = merge(jobChangedByA(), opBy(PHONE_B, 'patch', { status: 'closed' }));
		const fresh = merge(
			first.state,
			opBy(PHONE_C, 'patch', { status: 'repaired' }, 2),
			first.conflicts
		);
		expect([fresh.result.status, fresh.state!.fields.status, fresh.conflicts[0].status]).toEqual([
			'applied',
			'repaired',
			'open'
		]);
	});

	it('does not change the state it was given', () => {
		const state = jobChangedByA();
		const copy = structuredClone(state);
		merge(state, opBy(PHONE_B, 'patch', { status: 'closed', location: 'Bay 4' }));
		expect(state).toEqual(copy);
	});
});

describe('delete', () => {
	it('tombstones the record on the current version', () => {
		const out = merge(createdJob(), opBy(OFFICE, 'delete', {}));
		expect([out.result.status, out.state!.deleted, out.state!.version, out.feed]).toEqual([
			'applied',
			true,
			2,
			'delete'
		]);
	});

	it('tombstones on top of newer changes made by the same device', () => {
		const out = merge(jobChangedByA(), opBy(PHONE_A, 'delete', {}));
		expect([out.result.status, out.state!.deleted]).toEqual(['merged', true]);
	});

	it('becomes a conflict against a newer change by another device, keeping the record', () => {
		const state = jobChangedByA();
		const out = merge(state, opBy(PHONE_B, 'delete', {}));
		expect([out.result.status, out.result.reason, out.state, out.feed]).toEqual([
			'conflict',
			'stale_delete',
			state,
			null
		]);
	});

	it('keeps the delete and the newer writers in a conflict on the deleted pseudo-field', () => {
		const c = merge(jobChangedByA(), opBy(PHONE_B, 'delete', {})).conflicts[0];
		expect([
			c.field,
			c.server.writers.map((w) => w.deviceId),
			c.candidates.map((k) => [k.deviceId, k.value])
		]).toEqual([DELETED_FIELD, [PHONE_A.deviceId], [[PHONE_B.deviceId, true]]]);
	});

	it('joins a second stale delete to the open delete conflict', () => {
		const first = merge(jobChangedByA(), opBy(PHONE_B, 'delete', {}));
		const second = merge(first.state, opBy(PHONE_C, 'delete', {}), first.conflicts);
		expect([second.result.conflictId, second.conflicts[0].candidates.length]).toEqual([
			first.result.conflictId,
			2
		]);
	});

	it('closes an open delete conflict as agreed when a delete on the latest version lands', () => {
		const first = merge(jobChangedByA(), opBy(PHONE_B, 'delete', {}));
		const fresh = merge(first.state, opBy(OFFICE, 'delete', {}, 2), first.conflicts);
		expect([fresh.state!.deleted, fresh.conflicts[0].status]).toEqual([true, 'agreed']);
	});

	it('becomes a conflict when another device’s value waits in an open conflict', () => {
		const clash = merge(jobChangedByA(), opBy(PHONE_B, 'patch', { status: 'closed' }));
		const out = merge(clash.state, opBy(PHONE_A, 'delete', {}), clash.conflicts);
		expect([out.result.status, out.state!.deleted]).toEqual(['conflict', false]);
	});

	it('is a no-op applied on a record already deleted', () => {
		const deleted = merge(createdJob(), opBy(OFFICE, 'delete', {})).state!;
		const out = merge(deleted, opBy(PHONE_A, 'delete', {}));
		expect([out.result.status, out.result.version, out.feed]).toEqual(['applied', 2, null]);
	});

	it('rejects not_found when the record is missing', () => {
		expect(merge(null, opBy(PHONE_A, 'delete', {})).result.reason).toBe('not_found');
	});
});

describe('isSameValue', () => {
	it.each([
		[{ a: 1, b: [1, 2] }, { b: [1, 2], a: 1 }, true],
		[null, undefined, true],
		[[1, 2], [2, 1], false],
		[0.62, '0.62', false],
		[{ a: { x: 1, y: 2 } }, { a: { y: 2, x: 1 } }, true]
	])('compares %j with %j: %s', (a, b, expected) => expect(isSameValue(a, b)).toBe(expected));
});
