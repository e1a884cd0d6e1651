/**
 * The in-memory reference server (tests/helpers/memory-server.ts) against the real push
 * endpoint on MariaDB: the same generated op sequences through both must give the same
 * answers, the same change feed to phones that pull in the middle, the same stored records
 * (values, versions, per-field versions, tombstones) and the same clashes.
 *
 * Scenario (fast-check): three devices (two phones of a lead, one of the owner) create,
 * patch and delete customers and jobs and create readings, in pushes of one to three ops.
 * A device bases each patch or delete on the version it knows (from its answers and its
 * pulls, as the phone's client does), or on an older one (a stale patch), or on one the
 * server never wrote; devices pull at any moment; any earlier push may be sent again.
 * The ops are built from the reference server's answers and sent unchanged to both.
 */
import fc from 'fast-check';
import { QueryTypes } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { db } from '../../src/lib/server/db';
import { jobs } from '../../src/lib/server/services/jobs';
import { tests as testRecords } from '../../src/lib/server/services/tests';
import type { Change, Entity, Op, PushResult } from '../../src/lib/sync/protocol';
import { makeWorkshop, TEST_PASSWORD } from '../helpers/fixtures';
import { Client } from '../helpers/http';
import { createMemoryServer, pushToMemory, recordKey, type MemoryServer } from '../helpers/memory-server';

const base = inject('baseURL');
const RUNS = Number(process.env.DIFF_RUNS ?? 20);

type Kind = 'customer' | 'job' | 'reading';
const SLOTS = 3;
const NAMES = ['Ada Penhallow', 'Bo Trevithick', 'Cy Rosewarne'];
const PHONES = ['+44 1632 960 001', '+44 1632 960 002', null];
const COMPLAINTS = ['Misfire at idle', 'No start when warm', 'Flat battery overnight'];
const LOCATIONS = ['Bay 1', 'Bay 2', 'Driveway', null];
const STATUSES = ['open', 'testing', 'awaiting_parts'];

const patchArb = (kind: Kind) =>
	kind === 'customer'
		? fc.record(
				{ name: fc.constantFrom(...NAMES), phone: fc.constantFrom(...PHONES), reportConsent: fc.boolean() },
				{ requiredKeys: [] }
			)
		: fc.record(
				{ complaint: fc.constantFrom(...COMPLAINTS), location: fc.constantFrom(...LOCATIONS), status: fc.constantFrom(...STATUSES) },
				{ requiredKeys: [] }
			);

const stepArb = fc.oneof(
	{ weight: 3, arbitrary: fc.record({ type: fc.constant('create' as const), device: fc.nat(2), kind: fc.constantFrom<Kind>('customer', 'job', 'reading'), slot: fc.nat(SLOTS - 1), variant: fc.nat(2) }) },
	{ weight: 5, arbitrary: fc.constantFrom<Kind>('customer', 'job').chain((kind) => fc.record({ type: fc.constant('patch' as const), device: fc.nat(2), kind: fc.constant(kind), slot: fc.nat(SLOTS - 1), fields: patchArb(kind), base: fc.constantFrom('known', 'known', 'stale', 'stale', 'ahead') })) },
	{ weight: 1, arbitrary: fc.record({ type: fc.constant('patchReading' as const), device: fc.nat(2), slot: fc.nat(SLOTS - 1) }) },
	{ weight: 2, arbitrary: fc.record({ type: fc.constant('delete' as const), device: fc.nat(2), kind: fc.constantFrom<Kind>('customer', 'job'), slot: fc.nat(SLOTS - 1), base: fc.constantFrom('known', 'stale') }) },
	{ weight: 2, arbitrary: fc.record({ type: fc.constant('pull' as const), device: fc.nat(2) }) },
	{ weight: 1, arbitrary: fc.record({ type: fc.constant('resend' as const), which: fc.nat() }) }
);
type Step = typeof stepArb extends fc.Arbitrary<infer T> ? T : never;
const scenarioArb = fc.record({ steps: fc.array(stepArb, { minLength: 4, maxLength: 28 }), batch: fc.array(fc.integer({ min: 1, max: 3 }), { minLength: 28, maxLength: 28 }) });

type Device = { deviceId: string; userId: string; client: Client; cursor: number; memCursor: number; known: Map<string, number> };
let lead: Client;
let owner: Client;
let users: { lead: string; owner: string };
let testId: string;
let n = 0;
/** Answers seen over all runs (status or `rejected:reason`), to show the scenarios reach every case. */
const seenAnswers = new Map<string, number>();
let pulls = 0;

beforeAll(async () => {
	const ws = await makeWorkshop('Differential');
	const signIn = async (email: string) => {
		const c = new Client(base, `10.9.0.${++n}`);
		expect((await c.signIn(email, TEST_PASSWORD)).status).toBe(303);
		return c;
	};
	lead = await signIn(ws.users.lead.email);
	owner = await signIn(ws.users.owner.email);
	users = { lead: ws.users.lead.id, owner: ws.users.owner.id };
	const job = await jobs.create(ws.users.lead.actor, { complaint: 'Readings for the differential test' });
	testId = (await testRecords.create(ws.users.lead.actor, { jobId: job.id })).id as string;
});

const ENTITY: Record<Kind, Entity> = { customer: 'customer', job: 'job', reading: 'reading' };
const createFields = (kind: Kind, variant: number): Record<string, unknown> =>
	kind === 'customer'
		? { name: NAMES[variant], phone: PHONES[variant], email: `desk${variant}@example.com`, reportConsent: variant === 1 }
		: kind === 'job'
			? { complaint: COMPLAINTS[variant], location: LOCATIONS[variant], notes: null, status: 'open' }
			: { testId, checkKey: 'primary', samples: [{ value: 0.4 + variant / 10, unit: 'Ω' }] };

async function pushReal(device: Device, ops: Op[]): Promise<PushResult[]> {
	const r = await device.client.json('POST', '/api/sync/push', { deviceId: device.deviceId, ops });
	const body = await r.json();
	expect(r.status, JSON.stringify(body)).toBe(200);
	return body.results;
}

/** The answer without what may differ by design: the message text and the conflict id. */
const comparable = (r: PushResult) => ({ opId: r.opId, status: r.status, firstStatus: r.firstStatus, version: r.version, reason: r.reason, conflict: r.conflictId !== undefined });

/** Memory conflict ids map one-to-one onto the real ones. */
function matchConflictIds(map: Map<string, string>, mem: PushResult[], real: PushResult[]) {
	mem.forEach((m, i) => {
		if (!m.conflictId) return;
		const known = map.get(m.conflictId);
		if (known) expect(real[i].conflictId).toBe(known);
		else {
			expect([...map.values()]).not.toContain(real[i].conflictId);
			map.set(m.conflictId, real[i].conflictId!);
		}
	});
}

async function pullReal(device: Device, ids: Set<string>) {
	const out: Change[] = [];
	for (let page = 0; page < 100; page++) {
		const r = await device.client.get(`/api/sync/pull?cursor=${device.cursor}&limit=200`);
		const body = await r.json();
		expect(r.status).toBe(200);
		out.push(...body.changes.filter((c: Change) => ids.has(c.entityId)));
		device.cursor = body.cursor;
		if (!body.more) break;
	}
	return out;
}

/** A pulled change as both servers must give it: the record's fields the ops set, no more. */
function feedShape(c: Change, keys: string[]) {
	return { entity: c.entity, entityId: c.entityId, version: c.version, op: c.op, fields: c.op === 'upsert' ? Object.fromEntries(keys.map((k) => [k, c.record?.[k]])) : null };
}

const learn = (device: Device, op: Op, result: PushResult) => {
	if (result.version === undefined) return;
	const key = recordKey(op.entity, op.entityId);
	device.known.set(key, Math.max(device.known.get(key) ?? 0, result.version));
};

async function runScenario(steps: Step[], batches: number[]) {
	steps = [...steps];
	const tag = uuidv7().slice(-8);
	const devices: Device[] = [
		{ deviceId: `diff-a-${tag}`, userId: users.lead, client: lead, cursor: 0, memCursor: 0, known: new Map() },
		{ deviceId: `diff-b-${tag}`, userId: users.lead, client: lead, cursor: 0, memCursor: 0, known: new Map() },
		{ deviceId: `diff-c-${tag}`, userId: users.owner, client: owner, cursor: 0, memCursor: 0, known: new Map() }
	];
	// Start every device's real cursor at the end of the feed: earlier runs are not this one's.
	for (const d of devices) await pullReal(d, new Set());
	const ids: Record<Kind, string[]> = { customer: [], job: [], reading: [] };
	for (const k of Object.keys(ids) as Kind[]) for (let i = 0; i < SLOTS; i++) ids[k].push(uuidv7());
	const allIds = new Set(Object.values(ids).flat());
	const mem: MemoryServer = createMemoryServer();
	const sent: { device: Device; ops: Op[] }[] = [];
	const conflictIds = new Map<string, string>();
	const keysOf = (entity: string, id: string) => Object.keys(mem.records.get(recordKey(entity as Entity, id))?.state.fields ?? {});

	const send = async (device: Device, ops: Op[]) => {
		const memResults = pushToMemory(mem, { deviceId: device.deviceId, userId: device.userId, ops });
		const realResults = await pushReal(device, ops);
		expect(realResults.map(comparable), `push ${sent.length}: ${JSON.stringify(ops)}`).toEqual(memResults.map(comparable));
		matchConflictIds(conflictIds, memResults, realResults);
		for (const r of memResults) {
			const key = r.reason ? `${r.status}:${r.reason}` : r.status;
			seenAnswers.set(key, (seenAnswers.get(key) ?? 0) + 1);
		}
		ops.forEach((op, i) => learn(device, op, memResults[i]));
		sent.push({ device, ops });
	};

	const opFor = (step: Step): { device: Device; op: Op } | null => {
		if (step.type === 'pull' || step.type === 'resend') return null;
		const device = devices[step.device];
		const entity = step.type === 'patchReading' ? 'reading' : ENTITY[step.kind];
		const entityId = ids[step.type === 'patchReading' ? 'reading' : step.kind][step.slot];
		const known = device.known.get(recordKey(entity, entityId)) ?? 0;
		const op = (kind: Op['kind'], fields: Record<string, unknown>, baseVersion: number): Op => ({ opId: uuidv7(), entity, entityId, kind, baseVersion, fields, deviceTime: new Date().toISOString() });
		if (step.type === 'create') return { device, op: op('create', createFields(step.kind, step.variant), 0) };
		if (step.type === 'patchReading') return { device, op: op('patch', { checkKey: 'secondary' }, Math.max(1, known)) };
		if (!known) return null; // the phone never saw this record: it cannot edit it
		const baseVersion = step.base === 'stale' ? Math.max(1, known - 1) : step.base === 'ahead' ? known + 5 : known;
		if (step.type === 'delete') return { device, op: op('delete', {}, baseVersion) };
		return Object.keys(step.fields).length ? { device, op: op('patch', step.fields, baseVersion) } : null;
	};

	// Start: the office made two customers and two jobs, and every device pulled them.
	const office = devices[2];
	const seed = (['customer', 'job'] as const).flatMap((kind) =>
		[0, 1].map((slot): Op => ({ opId: uuidv7(), entity: kind, entityId: ids[kind][slot], kind: 'create', baseVersion: 0, fields: createFields(kind, slot), deviceTime: new Date().toISOString() }))
	);
	await send(office, seed);
	for (const step of devices.map((_, d) => ({ type: 'pull' as const, device: d }))) steps = [step, ...steps];

	let b = 0;
	for (let i = 0; i < steps.length; ) {
		const step = steps[i];
		if (step.type === 'pull') {
			const device = devices[step.device];
			const memChanges = mem.changes.slice(device.memCursor);
			device.memCursor = mem.changes.length;
			const realChanges = await pullReal(device, allIds);
			expect(realChanges.map((c) => feedShape(c, keysOf(c.entity, c.entityId)))).toEqual(memChanges.map((c) => feedShape(c, keysOf(c.entity, c.entityId))));
			for (const c of memChanges) device.known.set(recordKey(c.entity, c.entityId), c.version);
			if (memChanges.length) pulls++;
			i++;
			continue;
		}
		if (step.type === 'resend') {
			if (sent.length) {
				const again = sent[step.which % sent.length];
				await send(again.device, again.ops);
			}
			i++;
			continue;
		}
		// A push of up to `batches[b]` consecutive ops of the same device.
		const first = opFor(step);
		i++;
		if (!first) continue;
		const ops = [first.op];
		while (ops.length < batches[b % batches.length] && i < steps.length) {
			const next = steps[i];
			if (next.type === 'pull' || next.type === 'resend' || next.device !== step.device) break;
			const more = opFor(next);
			i++;
			if (more) ops.push(more.op);
		}
		b++;
		await send(first.device, ops);
	}
	await compareStored(mem, ids, conflictIds);
}

const TABLES = { customer: 'customers', job: 'jobs' } as const;
const snake = (k: string) => k.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);
const parse = (v: unknown) => (typeof v === 'string' && /^[[{]/.test(v) ? JSON.parse(v) : v);

async function compareStored(mem: MemoryServer, ids: Record<Kind, string[]>, conflictIds: Map<string, string>) {
	for (const kind of ['customer', 'job'] as const) {
		for (const id of ids[kind]) {
			const m = mem.records.get(recordKey(kind, id));
			const [row] = await db().query<Record<string, unknown>>(`SELECT * FROM ${TABLES[kind]} WHERE id = ?`, { replacements: [id], type: QueryTypes.SELECT });
			if (!m) {
				expect(row, `${kind} ${id} stored only in MariaDB`).toBeUndefined();
				continue;
			}
			const keys = Object.keys(m.state.fields);
			const versions = JSON.parse(row.field_versions as string);
			expect({
				version: row.version,
				deleted: row.deleted_at != null,
				fields: Object.fromEntries(keys.map((k) => [k, k === 'reportConsent' ? Boolean(row[snake(k)]) : row[snake(k)]])),
				fieldVersions: Object.fromEntries(keys.map((k) => [k, versions[k]]))
			}).toEqual({
				version: m.state.version,
				deleted: m.state.deleted,
				fields: m.state.fields,
				fieldVersions: m.state.fieldVersions
			});
		}
	}
	for (const id of ids.reading) {
		const m = mem.records.get(recordKey('reading', id));
		const [row] = await db().query<Record<string, unknown>>('SELECT test_id, check_key, samples FROM readings WHERE id = ?', { replacements: [id], type: QueryTypes.SELECT });
		if (!m) expect(row).toBeUndefined();
		else expect({ testId: row.test_id, checkKey: row.check_key, samples: parse(row.samples) }).toEqual(m.state.fields);
	}
	// Every clash, open or agreed, with its record's value and each device's candidate value.
	const rows = await db().query<Record<string, string>>('SELECT * FROM conflicts WHERE entity_id IN (?)', { replacements: [Object.values(ids).flat()], type: QueryTypes.SELECT });
	const real = rows.map((r) => ({
		id: r.id,
		entityId: r.entity_id,
		field: r.field,
		status: r.status,
		value: JSON.parse(r.server_value),
		candidates: Object.fromEntries(JSON.parse(r.candidates).map((c: { deviceId: string; value: unknown }) => [c.deviceId, c.value]))
	}));
	const expected = [...mem.conflicts.values()].map((c) => ({
		id: conflictIds.get(c.conflictId),
		entityId: c.entityId,
		field: c.field,
		status: c.status,
		value: c.server.value ?? null,
		candidates: Object.fromEntries(c.candidates.map((k) => [k.deviceId, k.value]))
	}));
	// An answer names one conflict (its first clashing field); the others are matched by content.
	const content = ({ id: _id, ...c }: { id?: string }) => JSON.stringify(c);
	expect(real.map(content).sort()).toEqual(expected.map(content).sort());
	for (const e of expected) if (e.id) expect(content(real.find((r) => r.id === e.id) ?? {})).toBe(content(e));
}

/**
 * A written scenario, run first, that reaches every kind of answer (the generated ones explore
 * around it): clashes, a merge, a stale delete, a base the server never wrote, a patch of a
 * reading, a create over a taken id, a patch of a deleted job, a push sent again.
 */
const EVERY_ANSWER: Step[] = [
	{ type: 'patch', device: 0, kind: 'job', slot: 0, fields: { location: 'Bay 1' }, base: 'known' },
	{ type: 'patch', device: 1, kind: 'job', slot: 0, fields: { location: 'Driveway' }, base: 'known' },
	{ type: 'patch', device: 2, kind: 'job', slot: 0, fields: { status: 'testing' }, base: 'known' },
	{ type: 'patch', device: 0, kind: 'customer', slot: 0, fields: { name: 'Cy Rosewarne' }, base: 'known' },
	{ type: 'delete', device: 2, kind: 'customer', slot: 0, base: 'known' },
	{ type: 'patch', device: 0, kind: 'job', slot: 1, fields: { status: 'testing' }, base: 'ahead' },
	{ type: 'patchReading', device: 1, slot: 0 },
	{ type: 'create', device: 0, kind: 'customer', slot: 0, variant: 2 },
	{ type: 'delete', device: 0, kind: 'job', slot: 1, base: 'known' },
	{ type: 'patch', device: 1, kind: 'job', slot: 1, fields: { location: 'Bay 1' }, base: 'known' },
	{ type: 'resend', which: 0 },
	{ type: 'pull', device: 1 }
];

describe('the real push endpoint against the reference server', () => {
	it(`gives the same answers, feed, records and clashes for ${RUNS} generated op sequences`, async () => {
		await fc.assert(
			fc.asyncProperty(scenarioArb, async ({ steps, batch }) => {
				await runScenario(steps as Step[], batch);
			}),
			{ numRuns: RUNS, endOnFailure: process.env.DIFF_SHRINK !== '1', ...(process.env.DIFF_SEED ? { seed: Number(process.env.DIFF_SEED) } : {}), examples: [[{ steps: EVERY_ANSWER, batch: Array(28).fill(1) }]] }
		);
		console.log(`differential: ${[...seenAnswers].map(([k, v]) => `${k} ${v}`).join(', ')}; ${pulls} pulls with changes`);
		// The generated scenarios must reach every kind of answer, or this test proves little.
		for (const answer of ['applied', 'merged', 'conflict', 'duplicate', 'rejected:not_found', 'rejected:id_conflict', 'rejected:base_ahead', 'rejected:append_only', 'conflict:stale_delete'])
			expect(seenAnswers.get(answer), answer).toBeGreaterThan(0);
		expect(pulls).toBeGreaterThan(0);
	}, 240_000);
});
