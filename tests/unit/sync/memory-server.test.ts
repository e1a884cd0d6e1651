import { describe, expect, it } from 'vitest';
import {
	applyOpsInMemory,
	createMemoryServer,
	listOpenConflicts,
	pushToMemory,
	recordKey
} from '../../helpers/memory-server';
import { resultSchema } from '$lib/sync/protocol';
import { JOB_FIELDS, JOB_ID, OFFICE, PHONE_A, PHONE_B, makeOp, uuid7 } from './fixtures';

const createJob = makeOp({ kind: 'create', baseVersion: 0, fields: JOB_FIELDS });
const withJob = () => applyOpsInMemory([{ ...OFFICE, ops: [createJob] }]).server;

describe('memory server', () => {
	it('answers a replayed opId as duplicate with the first answer', () => {
		const server = withJob();
		const patch = makeOp({ fields: { status: 'testing' } });
		const [first] = pushToMemory(server, { ...PHONE_A, ops: [patch] });
		const [again] = pushToMemory(server, { ...PHONE_A, ops: [patch] });
		expect(again).toEqual({ ...first, status: 'duplicate', firstStatus: 'applied' });
	});

	it('changes nothing on a replay', () => {
		const server = withJob();
		const patch = makeOp({ fields: { status: 'testing' } });
		pushToMemory(server, { ...PHONE_A, ops: [patch] });
		const before = structuredClone(server);
		pushToMemory(server, { ...PHONE_B, ops: [patch] });
		expect(server).toEqual(before);
	});

	it('answers a repeated opId within one batch as duplicate', () => {
		const patch = makeOp({ fields: { status: 'testing' } });
		const [results] = applyOpsInMemory([{ ...PHONE_A, ops: [patch, patch] }], withJob()).results;
		expect(results.map((r) => r.status)).toEqual(['applied', 'duplicate']);
	});

	it('replays a rejection with its reason', () => {
		const server = withJob();
		const clash = makeOp({ kind: 'create', baseVersion: 0, fields: { complaint: 'Flat battery' } });
		pushToMemory(server, { ...PHONE_A, ops: [clash] });
		const [again] = pushToMemory(server, { ...PHONE_A, ops: [clash] });
		expect([again.status, again.firstStatus, again.reason]).toEqual([
			'duplicate',
			'rejected',
			'id_conflict'
		]);
	});

	it('answers one result per op, in the order sent, each valid under the contract', () => {
		const ops = [
			makeOp({ fields: { status: 'testing' } }),
			makeOp({ entityId: uuid7(99, 5), fields: { status: 'x' } }),
			makeOp({ kind: 'delete', baseVersion: 2, fields: {} })
		];
		const [results] = applyOpsInMemory([{ ...PHONE_A, ops }], withJob()).results;
		expect(results.map((r) => [r.opId, r.status, resultSchema.safeParse(r).success])).toEqual([
			[ops[0].opId, 'applied', true],
			[ops[1].opId, 'rejected', true],
			[ops[2].opId, 'applied', true]
		]);
	});

	it('appends one change per write with consecutive seqs, none for a no-op', () => {
		const ops = [
			makeOp({ fields: { status: 'testing' } }),
			makeOp({ baseVersion: 2, fields: { status: 'testing' } })
		];
		const { server } = applyOpsInMemory([{ ...PHONE_A, ops }], withJob());
		expect(server.changes.map((c) => [c.seq, c.op, c.version])).toEqual([
			[1, 'upsert', 1],
			[2, 'upsert', 2]
		]);
	});

	it('stores a conflict and lists it as open for its record', () => {
		const { server } = applyOpsInMemory(
			[
				{ ...PHONE_A, ops: [makeOp({ fields: { status: 'testing' } })] },
				{ ...PHONE_B, ops: [makeOp({ fields: { status: 'closed' } })] }
			],
			withJob()
		);
		expect(listOpenConflicts(server, 'job', JOB_ID).map((c) => c.field)).toEqual(['status']);
	});

	it('does not change the server it starts from', () => {
		const start = withJob();
		const before = structuredClone(start);
		applyOpsInMemory([{ ...PHONE_A, ops: [makeOp({ fields: { status: 'testing' } })] }], start);
		expect(start).toEqual(before);
	});

	it('keys records by entity and id', () => {
		expect(withJob().records.get(recordKey('job', JOB_ID))?.state.version).toBe(1);
	});

	it('starts empty', () => {
		const s = createMemoryServer();
		expect([s.ledger.size, s.records.size, s.conflicts.size, s.changes.length]).toEqual([
			0, 0, 0, 0
		]);
	});
});
