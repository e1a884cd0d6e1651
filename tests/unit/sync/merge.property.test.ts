/**
 * Order independence of the merge, checked on the in-memory reference server.
 *
 * Scenario: a job exists at version 1 and every device has pulled it; then up to four devices,
 * offline, each queue creates of readings and patches of a few job fields, all on top of
 * version 1. Each device's outbox reaches the server in its own order, interleaved in any way
 * with the others, and any op may be sent again at any later moment (a lost answer).
 * Client contract assumed: a device sends a field only when it changed it, so its first value
 * for a field differs from the value it pulled.
 *
 * What holds, whatever the interleaving and duplication (each checked below):
 *  - the readings stored are exactly the readings created, with their fields;
 *  - per job field, let `final(d)` be the last value device `d` sent for it:
 *    no device sent it → the pulled value and no open conflict;
 *    every `final(d)` equal → the record holds that value and there is no open conflict;
 *    otherwise → exactly one open conflict on the field, whose server side and candidates
 *    map each sending device to exactly `final(d)`, the record holding one of them.
 *    (Which of the values the record holds depends on who arrived first; the map does not.)
 *  - sending everything again answers `duplicate` for every op and changes nothing.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { isSameValue } from '$lib/sync/merge';
import {
	applyOpsInMemory,
	listOpenConflicts,
	recordKey,
	type MemoryPush,
	type MemoryServer
} from '../../helpers/memory-server';
import type { Op } from '$lib/sync/protocol';
import {
	JOB_FIELDS,
	JOB_ID,
	OFFICE,
	PHONE_A,
	PHONE_B,
	PHONE_C,
	makeOp,
	uuid7,
	type Device
} from './fixtures';

const DEVICES: Device[] = [PHONE_A, PHONE_B, PHONE_C, { deviceId: 'phone-d', userId: 'tech-dor' }];
const FIELDS = ['status', 'location', 'complaint'] as const;
type Field = (typeof FIELDS)[number];
const VALUES = ['open', 'testing', 'Bay 2', 'Driveway', 'Misfire under load', 'No start'];

type Plan =
	| { type: 'reading'; value: number; again: boolean }
	| { type: 'patch'; fields: Partial<Record<Field, string>> };

const planArb: fc.Arbitrary<Plan> = fc.oneof(
	fc.record({
		type: fc.constant('reading' as const),
		value: fc.integer({ min: 0, max: 9999 }),
		again: fc.boolean()
	}),
	fc.record({
		type: fc.constant('patch' as const),
		fields: fc.dictionary(fc.constantFrom(...FIELDS), fc.constantFrom(...VALUES), {
			minKeys: 1,
			maxKeys: 3
		})
	})
);
const stepArb = fc.record({ device: fc.nat(3), resend: fc.option(fc.nat(), { nil: undefined }) });
const scenarioArb = fc.record({
	plans: fc.array(fc.array(planArb, { maxLength: 6 }), { minLength: 1, maxLength: 4 }),
	schedule: fc.array(stepArb, { maxLength: 40 }),
	other: fc.array(stepArb, { maxLength: 40 })
});

/** Turn plans into each device's outbox; a first value equal to the pulled one is not sent. */
function buildOutboxes(plans: Plan[][]): Op[][] {
	let n = 0;
	return plans.map((plan, d) => {
		const sent = new Set<Field>();
		const ops: Op[] = [];
		for (const p of plan) {
			if (p.type === 'reading') {
				const last = ops.findLast((o) => o.entity === 'reading');
				const again = p.again && last;
				const fields = again ? last.fields : { testId: uuid7(7, 7), value: p.value, unit: 'Ω' };
				const entityId = again ? last.entityId : uuid7(++n, 20 + d);
				ops.push(makeOp({ kind: 'create', baseVersion: 0, entity: 'reading', entityId, fields }));
				continue;
			}
			const fields = Object.fromEntries(
				Object.entries(p.fields).filter(
					([f, v]) => sent.has(f as Field) || v !== JOB_FIELDS[f as Field]
				)
			);
			Object.keys(fields).forEach((f) => sent.add(f as Field));
			if (Object.keys(fields).length) ops.push(makeOp({ fields }));
		}
		return ops;
	});
}

/** One arrival order: each outbox in its own order, interleaved by `schedule`, with resends. */
function interleave(
	outboxes: Op[][],
	schedule: { device: number; resend?: number }[]
): MemoryPush[] {
	const next = outboxes.map(() => 0);
	const sent: MemoryPush[] = [];
	const order: MemoryPush[] = [];
	const sendNext = (start: number) => {
		for (let i = 0; i < outboxes.length; i++) {
			const d = (start + i) % outboxes.length;
			if (next[d] < outboxes[d].length) {
				const push = { ...DEVICES[d], ops: [outboxes[d][next[d]++]] };
				sent.push(push);
				return order.push(push);
			}
		}
	};
	for (const step of schedule) {
		if (step.resend !== undefined && sent.length) order.push(sent[step.resend % sent.length]);
		else sendNext(step.device);
	}
	while (next.some((k, d) => k < outboxes[d].length)) sendNext(0);
	return order;
}

function seedServer(): MemoryServer {
	const create = makeOp({ kind: 'create', baseVersion: 0, entityId: JOB_ID, fields: JOB_FIELDS });
	return applyOpsInMemory([{ ...OFFICE, ops: [create] }]).server;
}

function readingsOf(server: MemoryServer) {
	const list = [...server.records.values()].filter((r) => r.entity === 'reading');
	return new Map(list.map((r) => [r.entityId, r.state.fields]));
}

/** Each device's last value per field, from the outboxes alone (no server involved). */
function finalValues(outboxes: Op[][], field: Field): Map<string, unknown> {
	const finals = new Map<string, unknown>();
	outboxes.forEach((ops, d) =>
		ops.forEach(
			(o) =>
				o.entity === 'job' && field in o.fields && finals.set(DEVICES[d].deviceId, o.fields[field])
		)
	);
	return finals;
}

/** What the server keeps for a field: device → value, over the record's writers and candidates. */
function keptValues(server: MemoryServer, field: Field) {
	const job = server.records.get(recordKey('job', JOB_ID))!.state;
	const open = listOpenConflicts(server, 'job', JOB_ID).filter((c) => c.field === field);
	const kept = new Map<string, unknown>(
		job.fieldWriters[field].map((w) => [w.deviceId, job.fields[field]])
	);
	open.forEach((c) => c.candidates.forEach((k) => kept.set(k.deviceId, k.value)));
	return { value: job.fields[field], open, kept };
}

function expectFieldSettled(server: MemoryServer, outboxes: Op[][], field: Field) {
	const finals = finalValues(outboxes, field);
	const { value, open, kept } = keptValues(server, field);
	const distinct = [...finals.values()].filter(
		(v, i, all) => all.findIndex((w) => isSameValue(v, w)) === i
	);
	if (finals.size === 0) expect([value, open.length]).toEqual([JOB_FIELDS[field], 0]);
	else if (distinct.length === 1) expect([value, open.length]).toEqual([distinct[0], 0]);
	else {
		expect(open.length).toBe(1);
		expect(kept).toEqual(finals);
		expect(open[0].server.value).toEqual(value);
	}
}

const expectedReadings = (outboxes: Op[][]) =>
	new Map(
		outboxes
			.flat()
			.filter((o) => o.entity === 'reading')
			.map((o) => [o.entityId, o.fields])
	);

describe('merge under any arrival order', () => {
	it('keeps every reading and settles every field the same way', () => {
		fc.assert(
			fc.property(scenarioArb, ({ plans, schedule }) => {
				const outboxes = buildOutboxes(plans);
				const { server } = applyOpsInMemory(interleave(outboxes, schedule), seedServer());
				expect(readingsOf(server)).toEqual(expectedReadings(outboxes));
				for (const field of FIELDS) expectFieldSettled(server, outboxes, field);
			}),
			{ numRuns: 300 }
		);
	});

	it('ends two different arrival orders with the same readings and the same kept values', () => {
		fc.assert(
			fc.property(scenarioArb, ({ plans, schedule, other }) => {
				const outboxes = buildOutboxes(plans);
				const one = applyOpsInMemory(interleave(outboxes, schedule), seedServer()).server;
				const two = applyOpsInMemory(interleave(outboxes, other), seedServer()).server;
				expect(readingsOf(one)).toEqual(readingsOf(two));
				for (const field of FIELDS)
					expect(keptValues(one, field).kept).toEqual(keptValues(two, field).kept);
			}),
			{ numRuns: 200 }
		);
	});

	it('answers duplicate to every op sent again and changes nothing', () => {
		fc.assert(
			fc.property(scenarioArb, ({ plans, schedule }) => {
				const order = interleave(buildOutboxes(plans), schedule);
				const { server } = applyOpsInMemory(order, seedServer());
				const replay = applyOpsInMemory(order, server);
				expect(replay.results.flat().every((r) => r.status === 'duplicate')).toBe(true);
				expect(replay.server).toEqual(server);
			}),
			{ numRuns: 200 }
		);
	});
});
