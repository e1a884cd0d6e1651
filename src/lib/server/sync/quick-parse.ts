/**
 * Quick parsers for the two shapes on the sync hot path: the push body (`pushBodySchema`)
 * and a reading's fields (`readingCreate`). The zod schemas stay the contract and the only
 * source of error messages; these accept only input the schema accepts, in its plain form,
 * and give the very output the schema would — the parsed objects themselves (a body parsed
 * from this request's JSON is nobody else's), with the ids lower-cased in place. Anything else — an error, an unknown key, a
 * string to trim — answers `null`, and the caller parses with zod.
 *
 * Why: a push carries up to 1,000 ops, and zod spends about 10 µs per op on these shapes,
 * more than recomputing the reading's result. `tests/unit/sync/quick-parse.test.ts` checks,
 * for generated valid and broken input, that every non-null answer equals zod's output and
 * that nothing zod refuses gets through.
 */
import { z } from 'zod';
import { ENTITIES, MAX_OPS, RESERVED_FIELDS, type Op, type PushBody } from '../../sync/protocol';
import type { readingCreate } from '../../schemas/records';

/** zod's own patterns, as `z.uuid()` and `z.iso.datetime({ offset: true })` use them. */
const UUID = z.core.regexes.uuid();
const DATETIME = z.core.regexes.datetime({ offset: true, local: false, precision: null });
/** A UUIDv7 in any case: what `isUuidV7` accepts. */
const UUID_V7 = /^[0-9a-f]{8}-[0-9a-f]{4}-7[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/i;
const FIELD_NAME = /^[A-Za-z][A-Za-z0-9_]{0,63}$/;
const CHECK_KEY = /^[a-z0-9_]{1,40}$/;
const RESERVED = new Set<string>(RESERVED_FIELDS);
const ENTITY = new Set<string>(ENTITIES);
const KIND = new Set(['create', 'patch', 'delete']);

const isObject = (v: unknown): v is Record<string, unknown> =>
	typeof v === 'object' && v !== null && !Array.isArray(v);
/** A plain object as JSON.parse makes it (zod copies records into one). */
const isPlainObject = (v: unknown): v is Record<string, unknown> =>
	isObject(v) && Object.getPrototypeOf(v) === Object.prototype;
const isString = (v: unknown): v is string => typeof v === 'string';
/** True when every own key of `o` is one of `keys` (zod would drop any other). */
function onlyKeys(o: Record<string, unknown>, keys: ReadonlySet<string>): boolean {
	for (const k in o) if (!keys.has(k)) return false;
	return true;
}

const BODY_KEYS = new Set(['deviceId', 'ops']);
const OP_KEYS = new Set(['opId', 'entity', 'entityId', 'kind', 'baseVersion', 'fields', 'deviceTime']);

function quickOp(o: unknown): Op | null {
	if (!isObject(o) || !onlyKeys(o, OP_KEYS)) return null;
	const { opId, entity, entityId, kind, baseVersion, fields, deviceTime } = o;
	if (!isString(opId) || !UUID_V7.test(opId)) return null;
	if (!isString(entity) || !ENTITY.has(entity)) return null;
	if (!isString(entityId) || !UUID.test(entityId)) return null;
	if (!isString(kind) || !KIND.has(kind)) return null;
	if (typeof baseVersion !== 'number' || !Number.isSafeInteger(baseVersion) || baseVersion < 0) return null;
	if (!isPlainObject(fields)) return null;
	let keys = 0;
	for (const k in fields) {
		if (!FIELD_NAME.test(k) || RESERVED.has(k)) return null;
		keys++;
	}
	if (!isString(deviceTime) || !DATETIME.test(deviceTime)) return null;
	if (kind === 'create' && (baseVersion !== 0 || !UUID_V7.test(entityId))) return null;
	if (kind === 'patch' && keys === 0) return null;
	// The parsed body is this request's own: the op object itself becomes the output.
	const op = o as Op;
	op.opId = opId.toLowerCase();
	op.entityId = entityId.toLowerCase();
	return op;
}

/** `pushBodySchema.parse(body)` when the body is plainly valid; `null` means: ask zod. */
export function quickPushBody(body: unknown): PushBody | null {
	if (!isObject(body) || !onlyKeys(body, BODY_KEYS)) return null;
	const { deviceId, ops } = body;
	if (!isString(deviceId) || deviceId.length < 1 || deviceId.length > 64) return null;
	if (!Array.isArray(ops) || ops.length < 1 || ops.length > MAX_OPS) return null;
	const out: Op[] = new Array(ops.length);
	for (let i = 0; i < ops.length; i++) {
		const op = quickOp(ops[i]);
		if (!op) return null;
		out[i] = op;
	}
	return { deviceId, ops: out };
}

type ReadingFields = z.output<typeof readingCreate>;
const READING_KEYS = new Set(['testId', 'checkKey', 'position', 'samples', 'rangeLabel', 'deviceResult']);
const SAMPLE_KEYS = new Set(['value', 'unit']);
const RESULT_KEYS = new Set(['value', 'verdict']);

/** `readingCreate.parse(fields)` for plain fields; `null` means: ask zod. */
export function quickReadingCreate(f: Record<string, unknown>): ReadingFields | null {
	if (!isPlainObject(f) || !onlyKeys(f, READING_KEYS)) return null;
	const { testId, checkKey, position, samples, rangeLabel, deviceResult } = f;
	if (!isString(testId) || !UUID.test(testId)) return null;
	if (!isString(checkKey) || !CHECK_KEY.test(checkKey)) return null;
	// optionalText(20): trimmed, at most 20, '' → null; only the already-trimmed form here.
	if (position !== undefined && position !== null) {
		if (!isString(position) || position.length > 20 || position.trim() !== position) return null;
	}
	if (!Array.isArray(samples) || samples.length < 1 || samples.length > 20) return null;
	// New sample objects, keys in the schema's order, as zod makes them (the stored text and
	// the check for a repeated create depend on it).
	const outSamples: ReadingFields['samples'] = new Array(samples.length);
	for (let i = 0; i < samples.length; i++) {
		const s = samples[i];
		if (!isPlainObject(s) || !onlyKeys(s, SAMPLE_KEYS)) return null;
		const { value, unit } = s;
		if (!(value === 'OL' || (typeof value === 'number' && Number.isFinite(value)))) return null;
		if (!isString(unit) || unit.length < 1 || unit.length > 4) return null;
		outSamples[i] = { value, unit };
	}
	if (rangeLabel !== undefined && rangeLabel !== null && (!isString(rangeLabel) || rangeLabel.length > 30)) return null;
	if (deviceResult !== undefined && deviceResult !== null) {
		// Other keys (kept by `.passthrough()`, a `__proto__` dropped) are left to zod.
		if (!isPlainObject(deviceResult) || !onlyKeys(deviceResult, RESULT_KEYS)) return null;
		const { value, verdict } = deviceResult;
		if (!(value === null || (typeof value === 'number' && Number.isFinite(value)))) return null;
		if (!isString(verdict) || verdict.length > 20) return null;
		f.deviceResult = { value, verdict };
	}
	// Plain and complete: the fields object itself is the output (an empty position is null).
	f.samples = outSamples;
	if (position === '') f.position = null;
	return f as ReadingFields;
}
