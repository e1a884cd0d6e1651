/**
 * The phone's side of the rulebook: a refused op lands under "Needs attention" with the
 * server's words and never holds up the rest of the outbox; discarding it takes its effect
 * off the phone's copy; a job made on the phone shows "number pending" until a pull brings
 * the server's number.
 */
import 'fake-indexeddb/auto';
import { v7 as uuidv7 } from 'uuid';
import { describe, expect, it } from 'vitest';
import { applyChanges, SyncEngine } from '../../../src/lib/client/engine';
import { discardIssue, listIssues } from '../../../src/lib/client/issues';
import { getRecord, openLocalDb } from '../../../src/lib/client/local-db';
import { countOutbox, writeLocal } from '../../../src/lib/client/outbox';
import { jobTitle, readJob } from '../../../src/lib/local/jobs';
import type { Op, PushResult } from '../../../src/lib/sync/protocol';

const json = (status: number, body: unknown) =>
	new Response(JSON.stringify(body), { status, headers: { 'content-type': 'application/json' } });
const emptyPull = () => json(200, { changes: [], cursor: 0, more: false });
const CLOSE_REFUSED = 'Only a technician or a workshop lead can close a job';

/** A server that refuses every change of a job's status and applies everything else. */
function refusingServer() {
	return async (url: string, init?: RequestInit) => {
		if (!url.includes('push')) return emptyPull();
		const ops = JSON.parse(String(init!.body)).ops as Op[];
		const results: PushResult[] = ops.map((o) =>
			o.entity === 'job' && 'status' in o.fields
				? { opId: o.opId, status: 'rejected', reason: 'forbidden', message: CLOSE_REFUSED }
				: { opId: o.opId, status: 'applied', version: o.kind === 'create' ? 1 : o.baseVersion + 1 }
		);
		return json(200, { results });
	};
}

async function phoneWithJob() {
	const db = await openLocalDb(uuidv7());
	const jobId = uuidv7();
	await applyChanges(
		db,
		[
			{
				seq: 1,
				entity: 'job',
				entityId: jobId,
				version: 3,
				op: 'upsert',
				record: { id: jobId, number: 1002, status: 'testing', complaint: 'Rough when warm', notes: null }
			}
		],
		1
	);
	return { db, jobId };
}

describe('a refused op on the phone', () => {
	it('is listed under Needs attention with the server’s words, and the ops behind it still go', async () => {
		const { db, jobId } = await phoneWithJob();
		await writeLocal(db, { entity: 'job', id: jobId, kind: 'patch', fields: { status: 'closed' } });
		await writeLocal(db, { entity: 'job', id: jobId, kind: 'patch', fields: { notes: 'Coil 3 swapped' } });
		await writeLocal(db, { entity: 'customer', kind: 'create', fields: { name: 'Invented Ltd' } });
		const report = await new SyncEngine(db, 'dev-1', refusingServer()).syncOnce();
		expect(report).toMatchObject({ state: 'idle', waiting: 0, issues: 1 });
		const [issue] = await listIssues(db);
		expect(issue.kind).toBe('rejected');
		expect(issue.result).toMatchObject({ reason: 'forbidden', message: CLOSE_REFUSED });
		expect((await getRecord(db, 'job', jobId))!.data.notes).toBe('Coil 3 swapped');
	});

	it('is undone on the phone when discarded: the status it had comes back, the later note stays', async () => {
		const { db, jobId } = await phoneWithJob();
		await writeLocal(db, { entity: 'job', id: jobId, kind: 'patch', fields: { status: 'closed' } });
		await writeLocal(db, { entity: 'job', id: jobId, kind: 'patch', fields: { notes: 'Plug gap checked' } });
		await new SyncEngine(db, 'dev-1', refusingServer()).syncOnce();
		expect((await readJob(db, jobId))!.status).toBe('closed'); // the phone's copy until discarded
		const [issue] = await listIssues(db);
		await discardIssue(db, issue.opId);
		expect(await listIssues(db)).toEqual([]);
		const job = (await readJob(db, jobId))!;
		expect(job.status).toBe('testing');
		expect(job.notes).toBe('Plug gap checked');
	});

	it('takes a refused new record off the phone, with the ops still waiting for it', async () => {
		const db = await openLocalDb(uuidv7());
		const rec = await writeLocal(db, { entity: 'spark_test', kind: 'create', fields: { position: '1' } });
		const refuseAll = async (url: string, init?: RequestInit) => {
			if (!url.includes('push')) return emptyPull();
			const ops = JSON.parse(String(init!.body)).ops as Op[];
			return json(200, {
				results: ops.map((o) => ({ opId: o.opId, status: 'rejected', reason: 'forbidden', message: 'No' }))
			});
		};
		await new SyncEngine(db, 'dev-1', refuseAll).syncOnce();
		await writeLocal(db, { entity: 'customer', kind: 'create', fields: { name: 'Stays' } });
		const [issue] = await listIssues(db);
		await discardIssue(db, issue.opId);
		expect(await getRecord(db, 'spark_test', rec.id)).toBeUndefined();
		expect(await countOutbox(db)).toBe(1); // the unrelated customer still waits to send
	});
});

describe('a job made on the phone', () => {
	it('shows "number pending" until a pull brings the server’s number', async () => {
		const db = await openLocalDb(uuidv7());
		const rec = await writeLocal(db, {
			entity: 'job',
			kind: 'create',
			fields: { complaint: 'Stalls at junctions', status: 'open' }
		});
		const before = (await readJob(db, rec.id))!;
		expect(before.number).toBeNull();
		expect(jobTitle(before.number)).toBe('Job · number pending');
		await applyChanges(
			db,
			[
				{
					seq: 7,
					entity: 'job',
					entityId: rec.id,
					version: 1,
					op: 'upsert',
					record: { id: rec.id, number: 1043, status: 'open', complaint: 'Stalls at junctions' }
				}
			],
			7
		);
		expect(jobTitle((await readJob(db, rec.id))!.number)).toBe('Job 1043');
	});
});
