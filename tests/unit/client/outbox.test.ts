import 'fake-indexeddb/auto';
import { v7 as uuidv7 } from 'uuid';
import { describe, expect, it } from 'vitest';
import { dbNameFor, getRecord, openLocalDb, type LocalDb } from '../../../src/lib/client/local-db';
import { countOutbox, listOutbox, writeLocal } from '../../../src/lib/client/outbox';

const fresh = () => openLocalDb(uuidv7());

describe('the local store and its outbox', () => {
	it('keeps ops in the order they were made', async () => {
		const db = await fresh();
		const job = await writeLocal(db, { entity: 'job', kind: 'create', fields: { complaint: 'Stalls' } });
		await writeLocal(db, { entity: 'job', id: job.id, kind: 'patch', fields: { status: 'testing' } });
		await writeLocal(db, { entity: 'job', id: job.id, kind: 'patch', fields: { notes: 'Checked plugs' } });
		const ops = (await listOutbox(db)).map((e) => [e.op.kind, Object.keys(e.op.fields)[0]]);
		expect(ops).toEqual([
			['create', 'complaint'],
			['patch', 'status'],
			['patch', 'notes']
		]);
	});

	it('writes the record and its outbox entry in one transaction over both stores', async () => {
		const db = await fresh();
		const calls: string[][] = [];
		const spy = new Proxy(db, {
			get(target, prop, receiver) {
				if (prop === 'transaction') {
					return (stores: string | string[], mode?: IDBTransactionMode) => {
						calls.push([stores].flat());
						return target.transaction(stores as never, mode);
					};
				}
				const v = Reflect.get(target, prop, receiver);
				return typeof v === 'function' ? v.bind(target) : v;
			}
		}) as LocalDb;
		await writeLocal(spy, { entity: 'customer', kind: 'create', fields: { name: 'Ada Fenn' } });
		expect(calls).toEqual([['records', 'outbox']]);
	});

	it('leaves neither the record nor the op behind when the write fails', async () => {
		const db = await fresh();
		await expect(writeLocal(db, { entity: 'job', id: uuidv7(), kind: 'patch', fields: { notes: 'x' } })).rejects.toThrow();
		expect(await countOutbox(db)).toBe(0);
		expect(await db.count('records')).toBe(0);
	});

	it('survives closing and reopening the database', async () => {
		const user = uuidv7();
		const db = await openLocalDb(user);
		const rec = await writeLocal(db, { entity: 'customer', kind: 'create', fields: { name: 'Noor Esk' } });
		db.close();
		const again = await openLocalDb(user);
		expect(await countOutbox(again)).toBe(1);
		expect((await getRecord(again, 'customer', rec.id))?.data.name).toBe('Noor Esk');
	});

	it('keeps each user’s records in their own database', async () => {
		const a = uuidv7();
		const b = uuidv7();
		expect(dbNameFor(a)).not.toBe(dbNameFor(b));
		const dbA = await openLocalDb(a);
		await writeLocal(dbA, { entity: 'customer', kind: 'create', fields: { name: 'Only A' } });
		const dbB = await openLocalDb(b);
		expect(await countOutbox(dbB)).toBe(0);
		expect(await dbB.count('records')).toBe(0);
	});

	it('bases a patch on the server version the phone holds, and a create on version 0', async () => {
		const db = await fresh();
		const rec = await writeLocal(db, { entity: 'job', kind: 'create', fields: { complaint: 'x' } });
		const tx = db.transaction('records', 'readwrite');
		await tx.store.put({ ...(await tx.store.get(['job', rec.id]))!, version: 4 });
		await tx.done;
		await writeLocal(db, { entity: 'job', id: rec.id, kind: 'patch', fields: { status: 'testing' } });
		expect((await listOutbox(db)).map((e) => e.op.baseVersion)).toEqual([0, 4]);
	});

	it('refuses to change an append-only record', async () => {
		const db = await fresh();
		const r = await writeLocal(db, { entity: 'reading', kind: 'create', fields: { checkKey: 'primary' }, jobId: uuidv7() });
		await expect(writeLocal(db, { entity: 'reading', id: r.id, kind: 'patch', fields: { checkKey: 'x' } })).rejects.toThrow(/append-only/);
	});
});
