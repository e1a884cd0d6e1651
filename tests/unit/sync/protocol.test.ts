import { describe, expect, it } from 'vitest';
import {
	APPEND_ONLY,
	ENTITIES,
	MAX_BODY_BYTES,
	MAX_OPS,
	changeSchema,
	describeFirstIssue,
	formatZodPath,
	hasTooManyOps,
	isAppendOnly,
	isUuidV7,
	opSchema,
	parsePullQuery,
	pullResponseSchema,
	pushBodySchema,
	resultSchema,
	type Entity
} from '$lib/sync/protocol';
import { UUID_V4, makeOp, uuid7 } from './fixtures';

const issuePath = (r: { success: boolean; error?: { issues: { path: PropertyKey[] }[] } }) =>
	r.error ? formatZodPath(r.error.issues[0].path) : null;

describe('entities', () => {
	it('lists exactly the seven mutable and seven append-only entities', () => {
		expect([...ENTITIES].sort()).toEqual(
			[
				'circuit_test',
				'component',
				'customer',
				'job',
				'photo',
				'photo_mark',
				'quote',
				'reading',
				'sheet',
				'signoff',
				'spark_test',
				'swap_test',
				'test',
				'vehicle'
			].sort()
		);
	});

	it.each(['reading', 'signoff', 'swap_test', 'photo', 'spark_test', 'photo_mark', 'circuit_test'] as Entity[])(
		'treats %s as append-only',
		(entity) => expect(isAppendOnly(entity)).toBe(true)
	);

	it.each(['customer', 'vehicle', 'job', 'test', 'component', 'sheet', 'quote'] as Entity[])(
		'treats %s as mutable',
		(entity) => expect(isAppendOnly(entity)).toBe(false)
	);

	it('keeps the append-only list inside the entity list', () => {
		expect(APPEND_ONLY.every((e) => (ENTITIES as readonly string[]).includes(e))).toBe(true);
	});
});

describe('isUuidV7', () => {
	it.each([
		[uuid7(5), true],
		[UUID_V4, false],
		['0190-not-a-uuid', false],
		['', false]
	])('says %s is a UUIDv7: %s', (id, expected) => expect(isUuidV7(id)).toBe(expected));
});

describe('opSchema', () => {
	it.each([
		['create', { kind: 'create', baseVersion: 0, fields: { complaint: 'No start' } }],
		['patch', { kind: 'patch', baseVersion: 3, fields: { status: 'testing' } }],
		['delete with no fields', { kind: 'delete', baseVersion: 3, fields: {} }]
	] as const)('accepts a well-formed %s', (_name, over) => {
		expect(opSchema.safeParse(makeOp(over)).success).toBe(true);
	});

	it.each([
		['a create with a baseVersion other than 0', { kind: 'create', baseVersion: 1 }, 'baseVersion'],
		[
			'a create of an id that is not a UUIDv7',
			{ kind: 'create', baseVersion: 0, entityId: UUID_V4 },
			'entityId'
		],
		['an opId that is not a UUIDv7', { opId: UUID_V4 }, 'opId'],
		['an entity outside the closed list', { entity: 'invoice' }, 'entity'],
		['an unknown kind', { kind: 'upsert' }, 'kind'],
		['a negative baseVersion', { baseVersion: -1 }, 'baseVersion'],
		['a fractional baseVersion', { baseVersion: 1.5 }, 'baseVersion'],
		['a patch with no fields', { kind: 'patch', fields: {} }, 'fields'],
		['a field the server owns', { fields: { version: 9 } }, 'fields.version'],
		['a field name with a dot', { fields: { 'a.b': 1 } }, 'fields.a.b'],
		['a deviceTime that is not ISO 8601', { deviceTime: '04/03/2031 09:15' }, 'deviceTime'],
		['fields that are not an object', { fields: [1, 2] }, 'fields']
	])('rejects %s, naming the field', (_name, over, path) => {
		const r = opSchema.safeParse(makeOp({ fields: { status: 'open' }, ...(over as object) }));
		expect(issuePath(r)).toBe(path);
	});

	it('rejects a __proto__ field sent in JSON', () => {
		const op = { ...makeOp(), fields: JSON.parse('{"__proto__": {"admin": true}}') };
		expect(opSchema.safeParse(op).success).toBe(false);
	});

	it('accepts a patch of a record whose id was not made on a device', () => {
		expect(
			opSchema.safeParse(makeOp({ entityId: UUID_V4, fields: { status: 'open' } })).success
		).toBe(true);
	});

	it('accepts a deviceTime with a UTC offset', () => {
		const op = makeOp({ fields: { status: 'open' }, deviceTime: '2031-03-04T10:15:00+01:00' });
		expect(opSchema.safeParse(op).success).toBe(true);
	});

	it('lower-cases ids', () => {
		const op = makeOp({ fields: { status: 'open' }, entityId: uuid7(7).toUpperCase() });
		expect(opSchema.parse(op).entityId).toBe(uuid7(7));
	});
});

describe('pushBodySchema', () => {
	const body = (over: object) => ({
		deviceId: 'phone-a',
		ops: [makeOp({ fields: { a: 1 } })],
		...over
	});

	it('accepts one op from a named device', () => {
		expect(pushBodySchema.safeParse(body({})).success).toBe(true);
	});

	it.each([
		['an empty deviceId', { deviceId: '' }, 'deviceId'],
		['a deviceId of 65 characters', { deviceId: 'x'.repeat(65) }, 'deviceId'],
		['no ops', { ops: [] }, 'ops'],
		[
			'more than MAX_OPS ops',
			{ ops: Array.from({ length: MAX_OPS + 1 }, () => makeOp({ fields: { a: 1 } })) },
			'ops'
		]
	])('rejects %s', (_name, over, path) => {
		expect(issuePath(pushBodySchema.safeParse(body(over)))).toBe(path);
	});

	it('accepts exactly MAX_OPS ops', () => {
		const ops = Array.from({ length: MAX_OPS }, () => makeOp({ fields: { a: 1 } }));
		expect(pushBodySchema.safeParse(body({ ops })).success).toBe(true);
	});

	it('names the first bad op and field for a 400', () => {
		const ops = [0, 1, 2, 3].map(() => makeOp({ fields: { a: 1 } }));
		ops[3] = { ...ops[3], entityId: 'not-an-id' };
		const r = pushBodySchema.safeParse(body({ ops }));
		expect(describeFirstIssue(r.error!)).toEqual({
			field: 'ops.3.entityId',
			message: 'Invalid UUID'
		});
	});

	it('names the body itself when it is not an object', () => {
		expect(describeFirstIssue(pushBodySchema.safeParse('ops').error!).field).toBe('_');
	});
});

describe('limits', () => {
	it('caps a push at 1,000 ops and 1 MiB', () => {
		expect([MAX_OPS, MAX_BODY_BYTES]).toEqual([1000, 1048576]);
	});

	it.each([
		[{ ops: new Array(MAX_OPS + 1).fill(0) }, true],
		[{ ops: new Array(MAX_OPS).fill(0) }, false],
		[{ ops: 'many' }, false],
		[null, false]
	])('counts too many ops before parsing (%#)', (body, expected) => {
		expect(hasTooManyOps(body)).toBe(expected);
	});
});

describe('formatZodPath', () => {
	it('joins keys and indexes with dots', () => {
		expect(formatZodPath(['ops', 3, 'fields', 'status'])).toBe('ops.3.fields.status');
	});
});

describe('resultSchema', () => {
	const opId = uuid7(1);
	it.each([
		[{ opId, status: 'applied', version: 1 }],
		[{ opId, status: 'merged', version: 4 }],
		[{ opId, status: 'conflict', version: 4, conflictId: uuid7(2) }],
		[{ opId, status: 'rejected', reason: 'id_conflict' }],
		[{ opId, status: 'duplicate', firstStatus: 'rejected', reason: 'not_found' }]
	])('accepts %j', (r) => expect(resultSchema.safeParse(r).success).toBe(true));

	it.each([
		['a rejection without a reason', { opId, status: 'rejected' }, 'reason'],
		['a conflict without its id', { opId, status: 'conflict', version: 2 }, 'conflictId'],
		['an applied op without a version', { opId, status: 'applied' }, 'version'],
		[
			'a duplicate without the first status',
			{ opId, status: 'duplicate', version: 1 },
			'firstStatus'
		],
		['an unknown reason', { opId, status: 'rejected', reason: 'nope' }, 'reason']
	])('rejects %s', (_name, r, path) => expect(issuePath(resultSchema.safeParse(r))).toBe(path));
});

describe('changeSchema and pullResponseSchema', () => {
	const change = {
		seq: 1,
		entity: 'job',
		entityId: uuid7(1),
		version: 1,
		op: 'upsert',
		record: { id: uuid7(1) }
	};

	it('accepts a page of changes', () => {
		expect(
			pullResponseSchema.safeParse({ changes: [change], cursor: 1, more: false }).success
		).toBe(true);
	});

	it('rejects an upsert without its record', () => {
		expect(issuePath(changeSchema.safeParse({ ...change, record: null }))).toBe('record');
	});

	it('accepts an evict without a record', () => {
		expect(changeSchema.safeParse({ ...change, op: 'evict', record: null }).success).toBe(true);
	});

	it('rejects a seq of 0', () => {
		expect(issuePath(changeSchema.safeParse({ ...change, seq: 0 }))).toBe('seq');
	});
});

describe('parsePullQuery', () => {
	const parse = (q: string) => parsePullQuery(new URLSearchParams(q));

	it('defaults to cursor 0 and limit 500', () => {
		expect(parse('').data).toEqual({ cursor: 0, limit: 500, v: 1 });
	});

	it('reads a cursor and a limit', () => {
		expect(parse('cursor=42&limit=1000').data).toEqual({ cursor: 42, limit: 1000, v: 1 });
	});

	it('reads version 2 with its larger pages and a snapshot token', () => {
		expect(parse('v=2&limit=5000&snapshot=12.3.0190a0b0-0000-7000-8000-000000000000').data).toEqual({
			cursor: 0,
			limit: 5000,
			v: 2,
			snapshot: '12.3.0190a0b0-0000-7000-8000-000000000000'
		});
	});

	it.each([
		['cursor=abc', 'cursor'],
		['cursor=-1', 'cursor'],
		['cursor=1.5', 'cursor'],
		['cursor=', 'cursor'],
		['cursor=1e3', 'cursor'],
		['limit=0', 'limit'],
		['limit=1001', 'limit'],
		['limit=ten', 'limit'],
		['v=2&limit=5001', 'limit'],
		['v=3', 'v'],
		['snapshot=1.0.', 'snapshot'],
		['v=2&snapshot=1;DROP', 'snapshot']
	])('rejects %s', (q, path) => expect(issuePath(parse(q))).toBe(path));
});
