/**
 * The sync contract shared by the server and the browser (DESIGN §5): the closed entity list,
 * the shapes of a push (ops and their results) and of a pull (changes), as zod schemas with
 * their inferred types. Pure and isomorphic: zod and uuid only.
 */
import { validate, version } from 'uuid';
import { z } from 'zod';

/** Entities that accept `create`, `patch` and `delete` (a tombstone). */
export const MUTABLE_ENTITIES = [
	'customer',
	'vehicle',
	'job',
	'test',
	'component',
	'sheet',
	'quote'
] as const;
/** Entities that accept only `create`: once written they are kept as they are. */
export const APPEND_ONLY = [
	'reading',
	'signoff',
	'swap_test',
	'photo',
	'spark_test',
	'photo_mark',
	'circuit_test'
] as const;
/** The closed list of entities that can travel through sync. */
export const ENTITIES = [...MUTABLE_ENTITIES, ...APPEND_ONLY] as const;

/** One of `ENTITIES`. */
export type Entity = (typeof ENTITIES)[number];
/** One of `APPEND_ONLY`. */
export type AppendOnlyEntity = (typeof APPEND_ONLY)[number];

/** True for the entities whose records may only be created, never patched nor deleted. */
export function isAppendOnly(entity: Entity): entity is AppendOnlyEntity {
	return (APPEND_ONLY as readonly string[]).includes(entity);
}

/** At most this many ops in one push (more is a 413, checked before parsing). */
export const MAX_OPS = 1000;
/** At most this many bytes in one push body, 1 MiB (more is a 413, checked before parsing). */
export const MAX_BODY_BYTES = 1024 * 1024;
/**
 * Ops a device sends per push (it halves the batch after a 413). Each push costs the server
 * a session check, a transaction and a few lookups whatever its size, so a phone back on the
 * workshop's network sends its readings in a few large pushes, not many small ones.
 */
export const PUSH_BATCH = 500;
/** Pull page size when the query gives none. */
export const DEFAULT_PULL_LIMIT = 500;
/** The largest pull page a query may ask for. */
export const MAX_PULL_LIMIT = 1000;
/** The largest page of a version-2 pull (a snapshot's pages are large and few). */
export const MAX_PULL_LIMIT_V2 = 5000;
/**
 * The page a phone asks for (version 2): the largest there is. A round trip on a driveway's
 * mobile signal costs more than the server's work on a page, and a technician's first sync
 * then fits in one or two (about 4.4 MB of JSON for 5,000 readings, some 120 KB compressed
 * for the bench's; `npm run bench:pull`).
 */
export const PHONE_PULL_LIMIT = MAX_PULL_LIMIT_V2;

/** True when `id` is a UUID whose version nibble is 7 (the ids devices make, sortable by time). */
export function isUuidV7(id: string): boolean {
	return validate(id) && version(id) === 7;
}

/** Any RFC 9562 UUID, normalised to lower case (MariaDB returns lower case). */
export const uuidSchema = z.uuid().transform((s) => s.toLowerCase());
/** A UUIDv7, as every id made on a device must be; normalised to lower case. */
export const uuidV7Schema = z
	.string()
	.refine(isUuidV7, 'Expected a UUIDv7 made on the device')
	.transform((s) => s.toLowerCase());

/**
 * Names no op may set: the server owns them. Field names otherwise start with a letter and
 * use letters, digits and `_` (this also keeps `__proto__` out of every record).
 */
export const RESERVED_FIELDS = [
	'id',
	'workshopId',
	'version',
	'fieldVersions',
	'fieldWriters',
	'deletedAt',
	'createdBy',
	'updatedBy',
	'deviceId',
	'deviceTime'
] as const;

const fieldName = z
	.string()
	.regex(/^[A-Za-z][A-Za-z0-9_]{0,63}$/, 'Field names are letters, digits and _')
	.refine(
		(k) => !(RESERVED_FIELDS as readonly string[]).includes(k),
		'This field is set by the server'
	);

/** An entity name from the closed list. */
export const entitySchema = z.enum(ENTITIES);
/** What an op does to its record. */
export const opKindSchema = z.enum(['create', 'patch', 'delete']);

/**
 * One operation from a device's outbox. Invariants: `opId` is a UUIDv7 and unique per op;
 * a create has `baseVersion` 0 and a UUIDv7 `entityId`; a patch changes at least one field;
 * a delete's `fields` are ignored (may be empty). `deviceTime` is for display only.
 */
export const opSchema = z
	.object({
		opId: uuidV7Schema,
		entity: entitySchema,
		entityId: uuidSchema,
		kind: opKindSchema,
		baseVersion: z.number().int().min(0),
		fields: z.record(fieldName, z.unknown()),
		deviceTime: z.iso.datetime({ offset: true })
	})
	.superRefine((op, ctx) => {
		if (op.kind === 'create' && op.baseVersion !== 0)
			ctx.addIssue({
				code: 'custom',
				path: ['baseVersion'],
				message: 'A create has baseVersion 0'
			});
		if (op.kind === 'create' && !isUuidV7(op.entityId))
			ctx.addIssue({ code: 'custom', path: ['entityId'], message: 'A new id must be a UUIDv7' });
		if (op.kind === 'patch' && Object.keys(op.fields).length === 0)
			ctx.addIssue({
				code: 'custom',
				path: ['fields'],
				message: 'A patch changes at least one field'
			});
	});

/** `POST /api/sync/push` body: 1 to `MAX_OPS` ops from one device, applied in order. */
export const pushBodySchema = z.object({
	deviceId: z.string().min(1).max(64),
	ops: z.array(opSchema).min(1).max(MAX_OPS)
});

/** A parsed op (ids lower-cased). */
export type Op = z.output<typeof opSchema>;
/** `create`, `patch` or `delete`. */
export type OpKind = z.output<typeof opKindSchema>;
/** A parsed push body. */
export type PushBody = z.output<typeof pushBodySchema>;

/**
 * Why an op was rejected (or, for `stale_delete`, why a delete became a conflict):
 * `id_conflict` a create for an existing id with other fields; `not_found` no such record
 * (or another workshop's, or a patch of a deleted record); `forbidden` the role may not;
 * `invalid` the fields fail the entity's own schema; `append_only` a patch or delete of an
 * append-only entity; `stale_delete` (with status `conflict`) a delete against changes made
 * since by another device: the record is kept; `base_ahead` a baseVersion the server never
 * wrote; `server_error` a transient failure: not stored in the ledger, so a retry may apply.
 */
export const REASONS = [
	'id_conflict',
	'not_found',
	'forbidden',
	'invalid',
	'append_only',
	'stale_delete',
	'base_ahead',
	'server_error'
] as const;
/** A reason code from `REASONS`. */
export const reasonSchema = z.enum(REASONS);
/** One of `REASONS`. */
export type Reason = z.output<typeof reasonSchema>;

/** The answers an op can get (see `resultSchema`). */
export const STATUSES = ['applied', 'duplicate', 'merged', 'conflict', 'rejected'] as const;
/** A status from `STATUSES`. */
export const statusSchema = z.enum(STATUSES);
/** One of `STATUSES`. */
export type Status = z.output<typeof statusSchema>;

/**
 * The answer for one op, in the order sent. Invariants: `applied`, `merged` and `conflict`
 * carry the record's `version` after the op; `conflict` carries a `conflictId`; `rejected`
 * carries a `reason`; `duplicate` repeats the first answer's fields with its status in
 * `firstStatus` (nothing changed the second time).
 */
export const resultSchema = z
	.object({
		opId: uuidSchema,
		status: statusSchema,
		firstStatus: statusSchema.exclude(['duplicate']).optional(),
		version: z.number().int().min(0).optional(),
		conflictId: uuidSchema.optional(),
		reason: reasonSchema.optional(),
		/** Why, in words, for a rejection the technician should understand. */
		message: z.string().max(500).optional()
	})
	.superRefine((r, ctx) => {
		const status = r.status === 'duplicate' ? r.firstStatus : r.status;
		const need = (ok: boolean, path: string, message: string) =>
			ok || ctx.addIssue({ code: 'custom', path: [path], message });
		need(
			r.status !== 'duplicate' || !!r.firstStatus,
			'firstStatus',
			'A duplicate names the first status'
		);
		need(status !== 'rejected' || !!r.reason, 'reason', 'A rejection has a reason');
		need(status !== 'conflict' || !!r.conflictId, 'conflictId', 'A conflict has an id');
		need(
			status === 'rejected' || r.version !== undefined,
			'version',
			'An accepted op has a version'
		);
	});
/** `POST /api/sync/push` answer: one result per op, in the order sent. */
export const pushResponseSchema = z.object({ results: z.array(resultSchema) });

/** The answer for one op. */
export type PushResult = z.output<typeof resultSchema>;
/** The push answer. */
export type PushResponse = z.output<typeof pushResponseSchema>;

/**
 * One row of the per-workshop change feed. `seq` is strictly increasing per workshop;
 * an `upsert` carries the record; `delete` may carry the tombstone; `evict` carries none.
 */
export const changeSchema = z
	.object({
		seq: z.number().int().min(1),
		entity: entitySchema,
		entityId: uuidSchema,
		version: z.number().int().min(0),
		op: z.enum(['upsert', 'delete', 'evict']),
		record: z.record(z.string(), z.unknown()).nullable()
	})
	.refine((c) => c.op !== 'upsert' || c.record !== null, {
		path: ['record'],
		message: 'An upsert carries the record'
	});
/**
 * `GET /api/sync/pull` answer: changes after the cursor, the new cursor, and whether more
 * wait. Version 2 adds `snapshot` (the token of the snapshot's next page), `reset` (on a
 * snapshot's first page: what the phone holds from before is replaced) and `keep` (on the
 * last page: the ids of the jobs in scope; the phone drops the others).
 */
export const pullResponseSchema = z.object({
	changes: z.array(changeSchema),
	cursor: z.number().int().min(0),
	more: z.boolean(),
	snapshot: z.string().max(80).optional(),
	reset: z.literal(true).optional(),
	keep: z.array(uuidSchema).optional()
});

/** One change-feed row. */
export type Change = z.output<typeof changeSchema>;
/** One pull page. */
export type PullResponse = z.output<typeof pullResponseSchema>;

const digits = (name: string) => z.string().regex(/^\d{1,15}$/, `${name} must be a whole number`);

/**
 * Pull query: `cursor` a non-negative integer (default 0), `limit` 1..1000 (default 500);
 * `v=2` the snapshot protocol (limit up to 5000), `snapshot` its token.
 */
export const pullQuerySchema = z
	.object({
		cursor: digits('cursor').default('0').transform(Number),
		limit: digits('limit').default(String(DEFAULT_PULL_LIMIT)).transform(Number),
		v: z.enum(['1', '2']).default('1').transform(Number),
		snapshot: z
			.string()
			.regex(/^\d{1,15}\.\d{1,3}\.[0-9a-f-]{0,36}$/, 'Not a snapshot token')
			.optional()
	})
	.superRefine((q, ctx) => {
		const max = q.v === 2 ? MAX_PULL_LIMIT_V2 : MAX_PULL_LIMIT;
		if (q.limit < 1 || q.limit > max)
			ctx.addIssue({ code: 'custom', path: ['limit'], message: `limit must be 1 to ${max}` });
		if (q.snapshot && q.v !== 2)
			ctx.addIssue({ code: 'custom', path: ['snapshot'], message: 'A snapshot needs v=2' });
	});
/** A parsed pull query: whole numbers, `limit` within 1..`MAX_PULL_LIMIT` (v2: `MAX_PULL_LIMIT_V2`). */
export type PullQuery = z.output<typeof pullQuerySchema>;

/** Parse `?cursor=&limit=&v=&snapshot=`; an absent parameter takes its default, an empty one is invalid. */
export function parsePullQuery(params: URLSearchParams) {
	return pullQuerySchema.safeParse({
		cursor: params.get('cursor') ?? undefined,
		limit: params.get('limit') ?? undefined,
		v: params.get('v') ?? undefined,
		snapshot: params.get('snapshot') ?? undefined
	});
}

/** A zod path as the dotted name a 400 shows, e.g. `['ops', 3, 'entityId']` → `ops.3.entityId`. */
export function formatZodPath(path: readonly PropertyKey[]): string {
	return path.map((p) => (typeof p === 'symbol' ? (p.description ?? '?') : String(p))).join('.');
}

/** The first problem of a failed parse, naming its field (`_` for the body itself). */
export function describeFirstIssue(error: z.ZodError): { field: string; message: string } {
	const issue = error.issues[0];
	return { field: formatZodPath(issue?.path ?? []) || '_', message: issue?.message ?? 'Invalid' };
}

/** True when a parsed JSON body holds more than `MAX_OPS` ops (a 413 before schema checks). */
export function hasTooManyOps(body: unknown): boolean {
	const ops = (body as { ops?: unknown } | null)?.ops;
	return Array.isArray(ops) && ops.length > MAX_OPS;
}
