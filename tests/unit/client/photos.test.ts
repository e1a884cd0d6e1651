/**
 * The phone's photo store (IndexedDB through fake-indexeddb): the upgrade from local database
 * version 1 keeps what the phone held; the waiting count; removing a photo that was never
 * sent drops it, removing a sent one queues a "removed" mark; the job's list leaves removed
 * photos out and shows the workshop's photos from pulled records; a reading's list holds the
 * photos of that reading only, the phone's and the workshop's.
 */
import 'fake-indexeddb/auto';
import { openDB } from 'idb';
import { v7 as uuidv7 } from 'uuid';
import { describe, expect, it } from 'vitest';
import { dbNameFor, getRecord, openLocalDb, type LocalDb, type LocalPhoto } from '../../../src/lib/client/local-db';
import { listOutbox } from '../../../src/lib/client/outbox';
import { countPhotos, jobPhotoList, readingPhotoList, removePhoto } from '../../../src/lib/client/photos';

const photo = (
	jobId: string,
	state: LocalPhoto['state'] = 'waiting',
	at: { testId?: string; readingId?: string } = {}
): LocalPhoto => ({
	id: uuidv7(),
	jobId,
	testId: at.testId ?? null,
	readingId: at.readingId ?? null,
	caption: null,
	blob: new Blob([new Uint8Array([0xff, 0xd8, 0xff, 0xd9])], { type: 'image/jpeg' }),
	type: 'image/jpeg',
	bytes: 4,
	width: 1,
	height: 1,
	sha256: '0'.repeat(64),
	state,
	attempts: 0,
	createdAt: new Date().toISOString()
});

describe('photos on the phone', () => {
	it('upgrades a version 1 database without losing what it held', async () => {
		const user = uuidv7();
		const v1 = await openDB(dbNameFor(user), 1, {
			upgrade(db) {
				const records = db.createObjectStore('records', { keyPath: ['entity', 'id'] });
				records.createIndex('by-entity', 'entity');
				records.createIndex('by-job', 'jobId');
				db.createObjectStore('outbox', { keyPath: 'seq', autoIncrement: true });
				db.createObjectStore('issues', { keyPath: 'opId' });
				db.createObjectStore('meta');
			}
		});
		await v1.put('records', { entity: 'job', id: 'j1', version: 3, jobId: 'j1', data: { complaint: 'Stalls' }, deleted: false, pending: 0, updatedAt: '' });
		v1.close();
		const db = await openLocalDb(user);
		expect((await getRecord(db, 'job', 'j1'))?.data.complaint).toBe('Stalls');
		await db.put('photos', photo('j1'));
		expect(await db.count('photos')).toBe(1);
	});

	it('counts waiting photos, drops an unsent one on remove and marks a sent one', async () => {
		const db: LocalDb = await openLocalDb(uuidv7());
		const jobId = uuidv7();
		const [unsent, sent] = [photo(jobId), photo(jobId, 'sent')];
		await db.put('photos', unsent);
		await db.put('photos', sent);
		expect(await countPhotos(db)).toBe(1);
		await removePhoto(db, unsent);
		expect(await db.get('photos', unsent.id)).toBeUndefined();
		expect(await listOutbox(db)).toEqual([]);
		await removePhoto(db, sent);
		const [entry] = await listOutbox(db);
		expect(entry.op).toMatchObject({ entity: 'photo_mark', kind: 'create', fields: { photoId: sent.id, mark: 'removed' } });
		expect((await jobPhotoList(db, jobId)).map((p) => p.id)).toEqual([]);
	});

	it('lists the workshop’s photos of the job from pulled records, served by the workshop', async () => {
		const db = await openLocalDb(uuidv7());
		const jobId = uuidv7();
		const mine = photo(jobId);
		await db.put('photos', mine);
		const theirs = uuidv7();
		await db.put('records', { entity: 'photo', id: theirs, version: 1, jobId, data: { jobId, caption: 'Plate and VIN', createdBy: 'u2' }, deleted: false, pending: 0, updatedAt: '' });
		const list = await jobPhotoList(db, jobId);
		expect(list.map((p) => [p.id, p.mine, p.state])).toEqual(
			[
				[mine.id, true, 'waiting'],
				[theirs, false, 'sent']
			].sort((a, b) => (String(a[0]) < String(b[0]) ? -1 : 1))
		);
		expect(list.find((p) => p.id === theirs)?.thumb).toBe(`/api/photos/${theirs}/file`);
	});

	it('lists a reading’s photos under that reading only, the phone’s and the workshop’s', async () => {
		const db = await openLocalDb(uuidv7());
		const jobId = uuidv7();
		const [testId, readingA, readingB] = [uuidv7(), uuidv7(), uuidv7()];
		const ofA = photo(jobId, 'waiting', { testId, readingId: readingA });
		const ofB = photo(jobId, 'waiting', { testId, readingId: readingB });
		const ofTest = photo(jobId, 'waiting', { testId });
		for (const p of [ofA, ofB, ofTest]) await db.put('photos', p);
		const pulled = uuidv7();
		await db.put('records', { entity: 'photo', id: pulled, version: 1, jobId, data: { jobId, testId, readingId: readingA, createdBy: 'u2' }, deleted: false, pending: 0, updatedAt: '' });
		// A photo of the same reading id on another job is not this job's.
		await db.put('photos', photo(uuidv7(), 'waiting', { testId, readingId: readingA }));

		const ofReadingA = await readingPhotoList(db, jobId, readingA);
		expect(ofReadingA.map((p) => [p.id, p.mine])).toEqual(
			[
				[ofA.id, true],
				[pulled, false]
			].sort((a, b) => (String(a[0]) < String(b[0]) ? -1 : 1))
		);
		expect(ofReadingA.every((p) => p.readingId === readingA && p.testId === testId)).toBe(true);
		expect((await readingPhotoList(db, jobId, readingB)).map((p) => p.id)).toEqual([ofB.id]);
		// Removed, it leaves the reading's list too.
		await removePhoto(db, ofA);
		expect((await readingPhotoList(db, jobId, readingA)).map((p) => p.id)).toEqual([pulled]);
		expect((await jobPhotoList(db, jobId)).find((p) => p.id === ofTest.id)?.readingId).toBeNull();
	});
});
