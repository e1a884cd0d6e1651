/**
 * The quick parsers of the sync hot path against the zod schemas they stand in for (zod is
 * the general-purpose reference here): for generated input, valid or broken in one place,
 * a non-null quick answer must equal zod's output exactly, and nothing zod refuses may pass.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { v7 as uuidv7, v4 as uuidv4 } from 'uuid';
import { quickPushBody, quickReadingCreate } from '$lib/server/sync/quick-parse';
import { ENTITIES, MAX_OPS, RESERVED_FIELDS, pushBodySchema } from '$lib/sync/protocol';
import { readingCreate } from '$lib/schemas/records';

const v7 = fc.constant(null).map(() => uuidv7());
/** Values that break one field or another: wrong types, edges of lengths, odd strings. */
const odd = fc.oneof(
	fc.constantFrom<unknown>(
		null,
		undefined,
		'',
		' ',
		' 1 ',
		'OL',
		'ol',
		0,
		-0,
		-1,
		1.5,
		2 ** 53,
		Number.NaN,
		Infinity,
		-Infinity,
		true,
		[],
		{},
		'ABC',
		'id',
		'version',
		'__proto__',
		'2026-02-30T10:00:00Z',
		'2026-12-01T10:00:00',
		'2026-12-01T10:00:00.123+01:00',
		'2026-12-01 10:00:00Z',
		'00000000-0000-0000-0000-000000000000',
		'ffffffff-ffff-ffff-ffff-ffffffffffff'
	),
	// every length limit of the schemas, and one past it
	fc.constantFrom(4, 5, 20, 21, 30, 31, 40, 41, 64, 65).map((n) => 'x'.repeat(n)),
	fc.string({ maxLength: 70 }),
	fc.double(),
	fc.integer(),
	v7.map((s) => s.toUpperCase()),
	fc.constant(null).map(() => uuidv4()),
	v7.map((s) => s.slice(0, 14) + '8' + s.slice(15)),
	v7.map((s) => s.slice(0, 19) + 'c' + s.slice(20))
);

/** Set `path` inside a JSON-like value to `value` (or delete it when `del`). */
function mutate(root: unknown, path: (string | number)[], value: unknown, del: boolean): unknown {
	const copy = structuredClone(root) as Record<string | number, unknown>;
	let cur = copy;
	for (const k of path.slice(0, -1)) {
		if (typeof cur[k] !== 'object' || cur[k] === null) return copy;
		cur = cur[k] as Record<string | number, unknown>;
	}
	const last = path[path.length - 1];
	if (del) delete cur[last];
	else cur[last] = value;
	return copy;
}

/** Every path to a leaf or a container inside a JSON-like value, plus one new key per object. */
function paths(v: unknown, prefix: (string | number)[] = []): (string | number)[][] {
	const out: (string | number)[][] = prefix.length ? [prefix] : [];
	if (Array.isArray(v)) v.forEach((x, i) => out.push(...paths(x, [...prefix, i])));
	else if (v && typeof v === 'object') {
		out.push([...prefix, 'extraKey']);
		for (const k of Object.keys(v)) out.push(...paths((v as Record<string, unknown>)[k], [...prefix, k]));
	}
	return out;
}

const sample = fc.record({
	value: fc.oneof(fc.constant<'OL'>('OL'), fc.double({ noNaN: true, noDefaultInfinity: true })),
	unit: fc.constantFrom('Ω', 'kΩ', 'MΩ', 'mΩ', 'V', 'mV')
});
const reading = fc.record(
	{
		testId: v7,
		checkKey: fc.stringMatching(/^[a-z0-9_]{1,40}$/),
		position: fc.oneof(fc.constant(null), fc.constant(''), fc.stringMatching(/^[A-Za-z0-9]{1,20}$/)),
		samples: fc.array(sample, { minLength: 1, maxLength: 20 }),
		rangeLabel: fc.oneof(fc.constant(null), fc.string({ maxLength: 30 })),
		deviceResult: fc.oneof(
			fc.constant(null),
			fc.record({
				value: fc.oneof(fc.constant(null), fc.double({ noNaN: true, noDefaultInfinity: true })),
				verdict: fc.constantFrom('within', 'low', 'high', 'open', 'depends', 'no_spec')
			})
		)
	},
	{ requiredKeys: ['testId', 'checkKey', 'samples'] }
);
const fieldName = fc
	.stringMatching(/^[A-Za-z][A-Za-z0-9_]{0,10}$/)
	.filter((k) => !(RESERVED_FIELDS as readonly string[]).includes(k));
const op = fc
	.record({
		kind: fc.constantFrom('create', 'patch', 'delete'),
		entity: fc.constantFrom(...ENTITIES),
		fields: fc.dictionary(fieldName, fc.jsonValue(), {
			maxKeys: 4
		}).map((d) => ({ ...d })), // a plain object, as JSON.parse makes
		baseVersion: fc.nat({ max: 50 }),
		deviceTime: fc
			.date({
				min: new Date('2020-01-01T00:00:00Z'),
				max: new Date('2030-12-31T00:00:00Z'),
				noInvalidDate: true
			})
			.map((d) => d.toISOString()),
		upper: fc.boolean()
	})
	.map(({ kind, upper, ...o }) => {
		const entityId = upper ? uuidv7().toUpperCase() : uuidv7();
		return {
			opId: uuidv7(),
			entityId,
			kind,
			...o,
			baseVersion: kind === 'create' ? 0 : o.baseVersion,
			fields: kind === 'patch' && !Object.keys(o.fields).length ? { note: 'x' } : o.fields
		};
	});
const body = fc.record({
	deviceId: fc.string({ minLength: 1, maxLength: 64 }),
	ops: fc.array(op, { minLength: 1, maxLength: 5 })
});

/** A valid value and one mutation of it (or none). */
const mutated = <T>(valid: fc.Arbitrary<T>) =>
	valid.chain((v) =>
		fc.record({
			valid: fc.constant(v),
			change: fc.option(
				fc.record({
					path: fc.constantFrom(...paths(v)),
					value: odd,
					del: fc.boolean()
				}),
				{ freq: 4 }
			)
		})
	);

/**
 * Zod's answer on one copy, the quick parser's on another (it may change its input in place:
 * ids lower-cased, an empty position made null). Copies by structuredClone are plain objects,
 * as JSON.parse makes them.
 */
function agrees(
	quick: (x: never) => unknown,
	schema: { safeParse: (x: unknown) => { success: boolean; data?: unknown } },
	input: unknown
) {
	const z = schema.safeParse(structuredClone(input));
	const q = quick(structuredClone(input) as never);
	if (q !== null) {
		expect(z.success).toBe(true);
		expect(q).toStrictEqual(z.data);
		// The parts stored as text must also come out with zod's key order.
		const text = (o: unknown) => {
			const r = o as { samples?: unknown; deviceResult?: unknown; ops?: { fields: unknown }[] };
			return JSON.stringify([r.samples, r.deviceResult, r.ops?.map((x) => x.fields)]);
		};
		expect(text(q)).toBe(text(z.data));
	}
	return q;
}

describe('quickPushBody', () => {
	it('answers like pushBodySchema for valid bodies and never lets a broken one pass', () => {
		fc.assert(
			fc.property(mutated(body), ({ valid, change }) => {
				const input = change ? mutate(valid, change.path, change.value, change.del) : valid;
				const q = agrees(quickPushBody, pushBodySchema, input);
				if (!change) expect(q).not.toBeNull(); // plain valid bodies take the quick path
			}),
			{ numRuns: 3000 }
		);
	}, 30_000); // 3,000 generated cases: a wall-clock limit is not what this checks

	it('leaves a __proto__ field name to zod, which drops it', () => {
		const text = `{"deviceId":"d","ops":[{"opId":"${uuidv7()}","entity":"reading","entityId":"${uuidv7()}","kind":"create","baseVersion":0,"deviceTime":"2026-12-01T08:00:00Z","fields":{"__proto__":{"x":1},"note":"a"}}]}`;
		const input = JSON.parse(text);
		expect(quickPushBody(input)).toBeNull();
		const z = pushBodySchema.parse(input);
		expect(Object.keys(z.ops[0].fields)).toEqual(['note']);
		expect(Object.getPrototypeOf(z.ops[0].fields)).toBe(Object.prototype);
	});

	it('lower-cases ids as the schema does', () => {
		const id = uuidv7();
		const q = quickPushBody({
			deviceId: 'd',
			ops: [
				{
					opId: id.toUpperCase(),
					entity: 'reading',
					entityId: id.toUpperCase(),
					kind: 'create',
					baseVersion: 0,
					fields: {},
					deviceTime: '2026-12-01T08:00:00.000Z'
				}
			]
		});
		expect(q?.ops[0].opId).toBe(id);
		expect(q?.ops[0].entityId).toBe(id);
	});

	it('leaves too many ops and a create with a base version to zod', () => {
		const one = fc.sample(op, 1)[0];
		expect(quickPushBody({ deviceId: 'd', ops: Array(MAX_OPS + 1).fill(one) })).toBeNull();
		expect(
			quickPushBody({ deviceId: 'd', ops: [{ ...one, kind: 'create', baseVersion: 1 }] })
		).toBeNull();
	});
});

describe('quickReadingCreate', () => {
	it('answers like readingCreate for valid fields and never lets broken ones pass', () => {
		fc.assert(
			fc.property(mutated(reading), ({ valid, change }) => {
				const input = change ? mutate(valid, change.path, change.value, change.del) : valid;
				if (typeof input !== 'object' || input === null) return;
				const q = agrees(quickReadingCreate, readingCreate, input);
				if (!change) expect(q).not.toBeNull();
			}),
			{ numRuns: 3000 }
		);
	}, 30_000); // 3,000 generated cases: a wall-clock limit is not what this checks

	const plain = () => ({
		testId: uuidv7(),
		checkKey: 'primary',
		position: '1',
		rangeLabel: '200 Ω',
		samples: [{ value: 0.5, unit: 'Ω' }],
		deviceResult: { value: 0.4, verdict: 'within' }
	});
	const x = (n: number) => 'x'.repeat(n);
	it.each([
		['checkKey', (f: Record<string, unknown>, n: number) => (f.checkKey = 'k'.repeat(n)), 40],
		['position', (f: Record<string, unknown>, n: number) => (f.position = x(n)), 20],
		['rangeLabel', (f: Record<string, unknown>, n: number) => (f.rangeLabel = x(n)), 30],
		['unit', (f: Record<string, unknown>, n: number) => (f.samples = [{ value: 1, unit: x(n) }]), 4],
		['verdict', (f: Record<string, unknown>, n: number) => (f.deviceResult = { value: 1, verdict: x(n) }), 20],
		['samples', (f: Record<string, unknown>, n: number) => (f.samples = Array(n).fill({ value: 1, unit: 'Ω' })), 20]
	] as const)('takes %s at its limit and leaves one past it to zod', (_, set, limit) => {
		const at = plain();
		set(at, limit);
		expect(agrees(quickReadingCreate, readingCreate, at)).not.toBeNull();
		const past = plain();
		set(past, limit + 1);
		expect(agrees(quickReadingCreate, readingCreate, past)).toBeNull();
		expect(readingCreate.safeParse(past).success).toBe(false);
	});

	it('leaves other keys of the device result to zod, which keeps them (passthrough) but drops __proto__', () => {
		const f = { ...plain(), deviceResult: { value: 1, verdict: 'within', u: 0.02 } };
		expect(agrees(quickReadingCreate, readingCreate, f)).toBeNull();
		expect(readingCreate.parse(f).deviceResult).toMatchObject({ u: 0.02 });
		const proto = JSON.parse('{"value":1,"verdict":"within","__proto__":{"x":1}}');
		expect(quickReadingCreate({ ...plain(), deviceResult: proto })).toBeNull();
	});

	it('orders each sample as the schema does, whatever order the phone sent', () => {
		const f = { ...plain(), samples: [{ unit: 'Ω', value: 0.5 }], deviceResult: { verdict: 'within', value: 0.4 } };
		const q = agrees(quickReadingCreate, readingCreate, f) as { samples: unknown; deviceResult: unknown };
		expect(JSON.stringify(q.samples)).toBe('[{"value":0.5,"unit":"Ω"}]');
		expect(JSON.stringify(q.deviceResult)).toBe('{"value":0.4,"verdict":"within"}');
	});

	it('turns an empty position into null, as optionalText does', () => {
		const f = { testId: uuidv7(), checkKey: 'primary', position: '', samples: [{ value: 1, unit: 'Ω' }] };
		expect(quickReadingCreate(f)).toStrictEqual(readingCreate.parse(f));
		expect(quickReadingCreate(f)?.position).toBeNull();
	});
});
