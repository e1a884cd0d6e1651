import 'fake-indexeddb/auto';
import { v7 as uuidv7 } from 'uuid';
import { describe, expect, it } from 'vitest';
import { applyChanges, backoffMs, retryAfterMs, SyncEngine } from '../../../src/lib/client/engine';
import { getMeta, getRecord, openLocalDb } from '../../../src/lib/client/local-db';
import { countOutbox, listOutbox, writeLocal } from '../../../src/lib/client/outbox';
import type { Op } from '../../../src/lib/sync/protocol';

type Handler = (url: string, body: { ops?: Op[] } | null) => Response | Promise<Response>;
function fakeServer(handler: Handler) {
	const calls: { url: string; ops: Op[] }[] = [];
	const fetcher = async (url: string, init?: RequestInit) => {
		const body = init?.body ? JSON.parse(String(init.body)) : null;
		calls.push({ url, ops: body?.ops ?? [] });
		return handler(url, body);
	};
	return { calls, fetcher };
}
const json = (status: number, body: unknown) => new Response(JSON.stringify(body), { status, headers: { 'content-type': 'application/json' } });
const applyAll = (ops: Op[]) => json(200, { results: ops.map((o) => ({ opId: o.opId, status: 'applied', version: o.kind === 'create' ? 1 : o.baseVersion + 1 })) });
const emptyPull = () => json(200, { changes: [], cursor: 0, more: false });

async function dbWithOps(n: number) {
	const db = await openLocalDb(uuidv7());
	for (let i = 0; i < n; i++) await writeLocal(db, { entity: 'customer', kind: 'create', fields: { name: `Customer ${i}` } });
	return db;
}

describe('the sync client', () => {
	it.each([
		['no connection', () => Promise.reject(new TypeError('Failed to fetch')), 'no_connection'],
		['a 503', () => json(503, {}), 'server_busy'],
		['a 500', () => json(500, {}), 'server_error']
	] as const)('says why it stopped as a code, never the server’s text: %s', async (_name, answer, code) => {
		const db = await dbWithOps(1);
		const engine = new SyncEngine(db, 'dev-1', fakeServer(answer as Handler).fetcher);
		expect(await engine.syncOnce()).toMatchObject({ state: 'offline', error: code });
	});

	it('sends the outbox in order and empties it', async () => {
		const db = await dbWithOps(5);
		const sent = (await listOutbox(db)).map((e) => e.op.opId);
		const s = fakeServer((url, body) => (url.includes('push') ? applyAll(body!.ops!) : emptyPull()));
		const engine = new SyncEngine(db, 'dev-1', s.fetcher);
		engine.batch = 2;
		const report = await engine.syncOnce();
		expect(report).toMatchObject({ state: 'idle', pushed: 5, waiting: 0 });
		expect(s.calls.filter((c) => c.url.includes('push')).flatMap((c) => c.ops.map((o) => o.opId))).toEqual(sent);
	});

	it('pauses on 401 and keeps every op for after sign-in', async () => {
		const db = await dbWithOps(3);
		let signedIn = false;
		const s = fakeServer((url, body) => (!signedIn ? json(401, { error: { code: 'signed_out' } }) : url.includes('push') ? applyAll(body!.ops!) : emptyPull()));
		const engine = new SyncEngine(db, 'dev-1', s.fetcher);
		expect((await engine.syncOnce()).state).toBe('signed_out');
		expect(await countOutbox(db)).toBe(3);
		signedIn = true;
		expect((await engine.syncOnce()).state).toBe('idle');
		expect(await countOutbox(db)).toBe(0);
	});

	it('stops at the first transient failure with that op still at the head', async () => {
		const db = await dbWithOps(4);
		const head = (await listOutbox(db))[2].op.opId;
		let calls = 0;
		const s = fakeServer((url, body) => {
			if (!url.includes('push')) return emptyPull();
			calls++;
			if (calls === 1) return applyAll(body!.ops!.slice(0, 2)); // the server answered two…
			return json(503, {});
		});
		const engine = new SyncEngine(db, 'dev-1', s.fetcher);
		engine.batch = 2;
		expect((await engine.syncOnce()).state).toBe('offline');
		const left = await listOutbox(db);
		expect(left.map((e) => e.op.opId)[0]).toBe(head);
		expect(left).toHaveLength(2);
	});

	it('treats no connection as offline and loses nothing', async () => {
		const db = await dbWithOps(2);
		const engine = new SyncEngine(db, 'dev-1', async () => {
			throw new TypeError('Failed to fetch');
		});
		expect((await engine.syncOnce()).state).toBe('offline');
		expect(await countOutbox(db)).toBe(2);
	});

	it('treats an answer cut off mid-body (the server died while sending it) as offline and keeps every op', async () => {
		const db = await dbWithOps(3);
		const cutOff = () =>
			new Response(
				new ReadableStream({
					start(c) {
						c.enqueue(new TextEncoder().encode('{"results":[{"opId":'));
						c.error(new TypeError('terminated'));
					}
				}),
				{ status: 200, headers: { 'content-type': 'application/json' } }
			);
		const report = await new SyncEngine(db, 'dev-1', async () => cutOff()).syncOnce();
		expect(report.state).toBe('offline');
		expect(await countOutbox(db)).toBe(3);
	});

	it('passes on how long a 429 asks to wait, and keeps every op', async () => {
		const db = await dbWithOps(2);
		const busy = () => new Response(JSON.stringify({ error: { code: 'throttled', message: 'Busy' } }), { status: 429, headers: { 'retry-after': '7' } });
		const report = await new SyncEngine(db, 'dev-1', async () => busy()).syncOnce();
		expect(report).toMatchObject({ state: 'offline', retryAfterMs: 7000, waiting: 2 });
	});

	it('reads Retry-After as seconds or as an HTTP date (RFC 9110 §10.2.3)', () => {
		const now = Date.parse('2031-03-04T09:15:00Z');
		expect(retryAfterMs('120', now)).toBe(120_000);
		expect(retryAfterMs('Tue, 04 Mar 2031 09:15:30 GMT', now)).toBe(30_000);
		expect(retryAfterMs('soon', now)).toBeUndefined();
		expect(retryAfterMs(null, now)).toBeUndefined();
	});

	it('keeps a rejected op as an issue without blocking the ops behind it', async () => {
		const db = await dbWithOps(3);
		const ops = await listOutbox(db);
		const s = fakeServer((url, body) =>
			url.includes('push')
				? json(200, { results: body!.ops!.map((o, i) => (i === 0 ? { opId: o.opId, status: 'rejected', reason: 'invalid' } : { opId: o.opId, status: 'applied', version: 1 })) })
				: emptyPull()
		);
		const report = await new SyncEngine(db, 'dev-1', s.fetcher).syncOnce();
		expect(report).toMatchObject({ waiting: 0, issues: 1 });
		expect((await db.getAll('issues'))[0]).toMatchObject({ opId: ops[0].op.opId, kind: 'rejected' });
	});

	it('records a clash for the lead and keeps the local copy based on the new version', async () => {
		const db = await dbWithOps(1);
		const [e] = await listOutbox(db);
		const s = fakeServer((url) =>
			url.includes('push') ? json(200, { results: [{ opId: e.op.opId, status: 'conflict', version: 3, conflictId: uuidv7() }] }) : emptyPull()
		);
		await new SyncEngine(db, 'dev-1', s.fetcher).syncOnce();
		expect((await db.getAll('issues'))[0].kind).toBe('conflict');
		expect((await getRecord(db, 'customer', e.op.entityId))?.version).toBe(3);
	});

	it('keeps a clash in what needs attention while the lead has not settled it, and drops it once settled', async () => {
		const db = await dbWithOps(1);
		const [e] = await listOutbox(db);
		const conflictId = uuidv7();
		let open = true;
		const s = fakeServer((url) =>
			url.includes('push')
				? json(200, { results: [{ opId: e.op.opId, status: 'conflict', version: 2, conflictId }] })
				: url.includes('/api/conflicts/open')
					? json(200, { open: open ? [conflictId] : [] })
					: emptyPull()
		);
		const engine = new SyncEngine(db, 'dev-1', s.fetcher);
		expect((await engine.syncOnce()).issues).toBe(1);
		expect(s.calls.some((c) => c.url === `/api/conflicts/open?ids=${conflictId}`)).toBe(true);
		open = false;
		expect((await engine.syncOnce()).issues).toBe(0);
		expect(await db.count('issues')).toBe(0);
	});

	it('pulls every page, stores the cursor, and keeps unsent local edits on top', async () => {
		const db = await openLocalDb(uuidv7());
		const jobId = uuidv7();
		await applyChanges(db, [{ seq: 1, entity: 'job', entityId: jobId, version: 1, op: 'upsert', record: { complaint: 'Old', status: 'open' } }], 1);
		await writeLocal(db, { entity: 'job', id: jobId, kind: 'patch', fields: { status: 'testing' } });
		const pages = [
			{ changes: [{ seq: 2, entity: 'job', entityId: jobId, version: 2, op: 'upsert', record: { complaint: 'New', status: 'open' } }], cursor: 2, more: true },
			{ changes: [], cursor: 3, more: false }
		];
		const s = fakeServer((url) => (url.includes('pull') ? json(200, pages.shift()) : json(503, {})));
		const engine = new SyncEngine(db, 'dev-1', s.fetcher);
		await engine.pullAll();
		const job = await getRecord(db, 'job', jobId);
		expect(job?.data).toMatchObject({ complaint: 'New', status: 'testing' });
		expect(job?.version).toBe(2);
		expect(await getMeta(db, 'cursor')).toBe(3);
	});

	it('removes an evicted job and everything under it', async () => {
		const db = await openLocalDb(uuidv7());
		const jobId = uuidv7();
		const testId = uuidv7();
		await applyChanges(
			db,
			[
				{ seq: 1, entity: 'job', entityId: jobId, version: 1, op: 'upsert', record: { complaint: 'x' } },
				{ seq: 2, entity: 'test', entityId: testId, version: 1, op: 'upsert', record: { jobId } },
				{ seq: 3, entity: 'job', entityId: jobId, version: 1, op: 'evict', record: null }
			],
			3
		);
		expect(await db.count('records')).toBe(0);
	});

	it('waits longer after each failure, with jitter, up to five minutes', () => {
		expect(backoffMs(0, () => 0)).toBe(500);
		expect(backoffMs(0, () => 1)).toBe(1000);
		expect(backoffMs(3, () => 1)).toBe(8000);
		expect(backoffMs(20, () => 1)).toBe(300_000);
		expect(backoffMs(4, () => 0.5)).toBeGreaterThan(backoffMs(3, () => 0.5));
	});
});

describe('what the phone keeps (pull v2)', () => {
	const job = (id: string, version = 1) => ({ seq: 1, entity: 'job' as const, entityId: id, version, op: 'upsert' as const, record: { id, complaint: 'Fault' } });
	const test = (id: string, jobId: string) => ({ seq: 2, entity: 'test' as const, entityId: id, version: 1, op: 'upsert' as const, record: { id, jobId } });

	it('resumes a snapshot with its token, then sweeps what it did not bring, never a record with a waiting op', async () => {
		const db = await openLocalDb(uuidv7());
		const [kept, gone, mine] = [uuidv7(), uuidv7(), uuidv7()];
		await applyChanges(db, [job(kept), job(gone), test(uuidv7(), gone)], 5);
		await applyChanges(db, [job(mine)], 6);
		await writeLocal(db, { entity: 'job', id: mine, kind: 'patch', jobId: mine, fields: { notes: 'Waiting to send' } });
		const urls: string[] = [];
		let step = 0;
		const s = fakeServer((url) => {
			urls.push(url);
			if (url.includes('push')) return json(503, {}); // not called: the pull runs with the op still waiting
			step++;
			if (step === 1) return json(200, { changes: [job(kept, 2)], cursor: 40, more: true, snapshot: '40.2.', reset: true });
			return json(200, { changes: [], cursor: 40, more: false, keep: [kept, mine] });
		});
		const engine = new SyncEngine(db, 'dev-1', s.fetcher);
		await engine.pullAll();
		expect(urls[0]).toContain('v=2&cursor=6');
		expect(urls[1]).toContain('snapshot=40.2.');
		expect(await getRecord(db, 'job', kept)).toMatchObject({ version: 2 });
		expect(await getRecord(db, 'job', gone)).toBeUndefined();
		expect(await db.getAllFromIndex('records', 'by-job', gone)).toEqual([]);
		expect(await getRecord(db, 'job', mine)).toMatchObject({ pending: 1 }); // not brought, but its op waits
		expect(await getMeta(db, 'snapshot')).toBeUndefined();
		expect(await getMeta(db, 'cursor')).toBe(40);
	});

	it('drops a job missing from keep and what is under it, keeping one with a waiting op', async () => {
		const db = await openLocalDb(uuidv7());
		const [a, b, c] = [uuidv7(), uuidv7(), uuidv7()];
		const tb = uuidv7();
		await applyChanges(db, [job(a), job(b), job(c), test(tb, b)], 9);
		await writeLocal(db, { entity: 'reading', kind: 'create', jobId: c, fields: { testId: uuidv7(), checkKey: 'primary', samples: [] } });
		const s = fakeServer(() => json(200, { changes: [], cursor: 9, more: false, keep: [a] }));
		await new SyncEngine(db, 'dev-1', s.fetcher).pullAll();
		expect(await getRecord(db, 'job', a)).toBeDefined();
		expect(await getRecord(db, 'job', b)).toBeUndefined();
		expect(await getRecord(db, 'test', tb)).toBeUndefined();
		expect(await getRecord(db, 'job', c)).toBeDefined(); // a reading on it waits to send
		expect(await countOutbox(db)).toBe(1);
	});
});
