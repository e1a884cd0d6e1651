/**
 * The pull at a workshop's scale, through the real endpoint (`GET /api/sync/pull?v=2`) and
 * the phone's own sync client (`src/lib/client/engine.ts` over fake-indexeddb): what a
 * technician receives, what leaves the phone (a job moved away, a job closed outside the
 * window), and a phone offline for longer than the feed keeps.
 */
import 'fake-indexeddb/auto';
import { IDBFactory } from 'fake-indexeddb';
import { QueryTypes } from 'sequelize';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { SyncEngine } from '../../src/lib/client/engine';
import { listByJob, openLocalDb, type LocalDb } from '../../src/lib/client/local-db';
import { countOutbox, writeLocal } from '../../src/lib/client/outbox';
import { db } from '../../src/lib/server/db';
import { Job } from '../../src/lib/server/db/models';
import { components, sheets } from '../../src/lib/server/services/components';
import { jobs } from '../../src/lib/server/services/jobs';
import { lastSeq, trimFeed } from '../../src/lib/server/sync/pull';
import { saveWindows, windowsOf } from '../../src/lib/server/sync/scope';
import { makeWorkshop, TEST_PASSWORD } from '../helpers/fixtures';
import { Client } from '../helpers/http';
import { create, push } from '../helpers/sync';

const base = inject('baseURL');
let n = 0;

async function signedIn(email: string) {
	const c = new Client(base, `10.21.0.${++n}`);
	expect((await c.signIn(email, TEST_PASSWORD)).status).toBe(303);
	return c;
}

type Change = { seq: number; entity: string; entityId: string; op: string; version: number; record: Record<string, unknown> | null };
type Page = { changes: Change[]; cursor: number; more: boolean; snapshot?: string; reset?: true; keep?: string[] };

/** Every page of a version-2 pull from `cursor` (snapshot pages included); how many round trips. */
async function pullV2(c: Client, cursor = 0, limit = 50) {
	const changes: Change[] = [];
	let snapshot: string | undefined;
	let trips = 0;
	let last: Page | undefined;
	for (; trips < 1000; ) {
		const r = await c.get(`/api/sync/pull?v=2&cursor=${cursor}&limit=${limit}${snapshot ? `&snapshot=${snapshot}` : ''}`);
		trips++;
		const page = (await r.json()) as Page;
		if (r.status !== 200) throw new Error(`pull ${r.status}: ${JSON.stringify(page)}`);
		changes.push(...page.changes);
		cursor = page.cursor;
		snapshot = page.snapshot;
		last = page;
		if (!page.more) break;
	}
	return { changes, cursor, trips, keep: last?.keep ?? [], reset: false };
}

/**
 * A coil's primary winding, cold spec 0.36–0.55 Ω — common practice, no published source
 * (the figures only need to make a valid sheet; nothing here judges them).
 */
const CHECKS = [
	{ key: 'primary', label: 'Primary winding', quantity: 'resistance', from: '1', to: '2', condition: 'key_off', unit: 'Ω', openOk: false, bands: [{ fromC: null, toC: null, min: 0.36, max: 0.55 }] }
];
const METER = { ranges: [{ label: '200 Ω', resolution: 0.01, pctOfReading: 0.5, counts: 2 }], leadResistance: 0.1, relativeMode: false };

async function library(w: Awaited<ReturnType<typeof makeWorkshop>>) {
	const l = w.users.lead.actor;
	const componentId = (await components.create(l, { partNumber: `SP-${w.workshop.id.slice(-6)}`, kind: 'ignition_coil' })).id as string;
	const draft = await sheets.create(l, { componentId, checks: CHECKS });
	await sheets.update(l, draft.id as string, draft.version as number, {}, { serverFields: { state: 'approved', approvedBy: l.userId, approvedAt: new Date() } });
	return { componentId, sheetId: draft.id as string };
}

/** A test with `count` readings on a job, pushed by `c`; returns their ids. */
async function testWithReadings(c: Client, lib: { componentId: string; sheetId: string }, jobId: string, count: number) {
	const t = create('test', { jobId, ...lib, meter: METER, temperature: { mode: 'measured', tempC: 20 } });
	const rs = Array.from({ length: count }, (_, i) => create('reading', { testId: t.entityId, checkKey: 'primary', samples: [{ value: 0.4 + i / 1000, unit: 'Ω' }] }));
	const res = await push(c, `dev-${c.address}`, [t, ...rs]);
	expect(res.every((r) => r.status === 'applied')).toBe(true);
	return { testId: t.entityId, readings: rs.map((r) => r.entityId) };
}

/** A phone: the app's sync client over its own IndexedDB, signed in as `c`. */
async function phoneOf(c: Client, userId: string) {
	const g = globalThis as { indexedDB: IDBFactory };
	const previous = g.indexedDB;
	g.indexedDB = new IDBFactory();
	let local: LocalDb;
	try {
		local = await openLocalDb(userId);
	} finally {
		g.indexedDB = previous;
	}
	let online = true;
	const engine = new SyncEngine(local, `phone-${userId.slice(-6)}`, async (url, init = {}) => {
		if (!online) throw new TypeError('Failed to fetch');
		const headers = new Headers(init.headers);
		for (const [k, v] of Object.entries(c.headers())) headers.set(k, v);
		return fetch(base + url, { ...init, headers });
	});
	return { db: local, engine, offline: () => (online = false), online: () => (online = true) };
}

const has = async (local: LocalDb, entity: string, id: string) => Boolean(await local.get('records', [entity, id]));

describe('pull v2: scope in SQL', () => {
	let w: Awaited<ReturnType<typeof makeWorkshop>>;
	let lib: { componentId: string; sheetId: string };
	let mine: string;
	let theirs: string;
	let tech: Client;
	let app: Client;

	beforeAll(async () => {
		w = await makeWorkshop('Scale');
		lib = await library(w);
		const l = w.users.lead.actor;
		mine = (await jobs.create(l, { complaint: 'Misfire when warm', assigneeId: w.users.technician.id })).id as string;
		theirs = (await jobs.create(l, { complaint: 'Hard start', assigneeId: w.users.apprentice.id })).id as string;
		tech = await signedIn(w.users.technician.email);
		app = await signedIn(w.users.apprentice.email);
	});

	it('gives a technician a snapshot of their own job, never another one, and pages it with the token', async () => {
		const own = await testWithReadings(tech, lib, mine, 7);
		const other = await testWithReadings(app, lib, theirs, 40);
		const first = await tech.get('/api/sync/pull?v=2&cursor=0&limit=3');
		const page = (await first.json()) as Page;
		expect(page.reset).toBe(true);
		expect(page.snapshot).toMatch(/^\d+\.\d+\./);
		const all = await pullV2(tech, 0, 3);
		const ids = all.changes.map((c) => c.entityId);
		expect(ids).toEqual(expect.arrayContaining([mine, own.testId, ...own.readings, lib.componentId, lib.sheetId]));
		for (const id of [theirs, other.testId, ...other.readings]) expect(ids).not.toContain(id);
		expect(new Set(ids).size).toBe(ids.length); // no record twice across the snapshot's pages
		expect(all.keep).toEqual([mine]);
		expect(all.cursor).toBe(await lastSeq(w.workshop.id));
	});

	it('moves the cursor to the end in one round trip when nothing new is in scope', async () => {
		const from = (await pullV2(tech)).cursor;
		await testWithReadings(app, lib, theirs, 120); // the apprentice's work: not the technician's
		const next = await pullV2(tech, from, 50);
		expect(next.changes).toEqual([]);
		expect(next.trips).toBe(1);
		expect(next.cursor).toBe(await lastSeq(w.workshop.id));
		const lead = await pullV2(await signedIn(w.users.lead.email), from, 50);
		expect(lead.changes.filter((c) => c.entity === 'reading')).toHaveLength(120);
	});

	it('evicts a job moved away from the technician, on the phone too', async () => {
		const l = w.users.lead.actor;
		const moving = (await jobs.create(l, { complaint: 'Lamp flickers', assigneeId: w.users.technician.id })).id as string;
		const work = await testWithReadings(tech, lib, moving, 3);
		const phone = await phoneOf(tech, w.users.technician.id);
		expect((await phone.engine.syncOnce()).state).toBe('idle');
		expect(await has(phone.db, 'job', moving)).toBe(true);
		expect(await has(phone.db, 'reading', work.readings[0])).toBe(true);
		await jobs.update(l, moving, (await Job.findByPk(moving))!.version, { assigneeId: w.users.apprentice.id });
		expect((await phone.engine.syncOnce()).state).toBe('idle');
		expect(await has(phone.db, 'job', moving)).toBe(false);
		expect(await listByJob(phone.db, moving)).toEqual([]);
		expect(await has(phone.db, 'job', mine)).toBe(true);
	});

	it('drops a job closed 31 days ago from the phone and keeps one closed 29 days ago', async () => {
		const l = w.users.lead.actor;
		const old = (await jobs.create(l, { complaint: 'Old fault', assigneeId: w.users.technician.id })).id as string;
		const recent = (await jobs.create(l, { complaint: 'Recent fault', assigneeId: w.users.technician.id })).id as string;
		const work = await testWithReadings(tech, lib, old, 2);
		const phone = await phoneOf(tech, w.users.technician.id);
		expect((await phone.engine.syncOnce()).state).toBe('idle');
		expect(await has(phone.db, 'job', old)).toBe(true);
		for (const id of [old, recent]) await jobs.update(l, id, (await Job.findByPk(id))!.version, { status: 'closed' });
		const closedAt = async (id: string) =>
			(await db().query<{ c: Date | null }>('SELECT closed_at AS c FROM jobs WHERE id = ?', { replacements: [id], type: QueryTypes.SELECT }))[0].c;
		expect(await closedAt(old)).not.toBeNull(); // the trigger set it when the job closed
		const backdate = (id: string, days: number) =>
			db().query('UPDATE jobs SET closed_at = UTC_TIMESTAMP(3) - INTERVAL ? DAY WHERE id = ?', { replacements: [days, id] });
		await backdate(old, 31);
		await backdate(recent, 29);
		expect((await phone.engine.syncOnce()).state).toBe('idle');
		expect(await has(phone.db, 'job', old)).toBe(false);
		expect(await has(phone.db, 'reading', work.readings[0])).toBe(false);
		expect(await has(phone.db, 'job', recent)).toBe(true);
		// The window is the workshop's: ten days, and the one closed 29 days ago goes too.
		await saveWindows(w.workshop.id, w.users.lead.id, { phoneDays: 10, deskDays: 30 });
		expect((await phone.engine.syncOnce()).state).toBe('idle');
		expect(await has(phone.db, 'job', recent)).toBe(false);
		await saveWindows(w.workshop.id, w.users.lead.id, { phoneDays: 30, deskDays: 30 });
		// A lead's phone keeps the last 30 days too; the older job is fetched on demand.
		const lead = await signedIn(w.users.lead.email);
		const leadPull = await pullV2(lead, 0, 500);
		expect(leadPull.keep).not.toContain(old);
		expect(leadPull.changes.map((c) => c.entityId)).not.toContain(old);
		const r = await lead.get(`/api/sync/jobs/${old}`);
		expect(r.status).toBe(200);
		const fetched = (await r.json()) as { changes: Change[] };
		expect(fetched.changes.map((c) => c.entityId)).toEqual(expect.arrayContaining([old, work.testId, ...work.readings]));
		// … but not by a technician for a job that is not theirs.
		expect((await tech.get(`/api/sync/jobs/${theirs}`)).status).toBe(404);
	});
});

describe('pull v2: a phone offline for longer than the feed keeps', () => {
	it('recovers by snapshot, with nothing lost from its outbox', async () => {
		const w = await makeWorkshop('Long offline');
		const lib = await library(w);
		const l = w.users.lead.actor;
		const jobId = (await jobs.create(l, { complaint: 'No crank', assigneeId: w.users.technician.id })).id as string;
		const tech = await signedIn(w.users.technician.email);
		const gone = await testWithReadings(tech, lib, jobId, 1);
		const phone = await phoneOf(tech, w.users.technician.id);
		expect((await phone.engine.syncOnce()).state).toBe('idle');
		const oldCursor = (await phone.db.get('meta', 'cursor')) as number;
		expect(await has(phone.db, 'test', gone.testId)).toBe(true);

		// Offline: a test and five readings wait in the outbox.
		phone.offline();
		const test = await writeLocal(phone.db, { entity: 'test', kind: 'create', jobId, fields: { jobId, ...lib, meter: METER, temperature: { mode: 'measured', tempC: 18 } } });
		const readings = [];
		for (let i = 0; i < 5; i++)
			readings.push(await writeLocal(phone.db, { entity: 'reading', kind: 'create', jobId, fields: { testId: test.id, checkKey: 'primary', samples: [{ value: 0.41 + i / 100, unit: 'Ω' }] } }));
		expect((await phone.engine.syncOnce()).state).toBe('offline');
		expect(await countOutbox(phone.db)).toBe(6);

		// Meanwhile the workshop works on: the job's notes change, the old test is deleted, and
		// the feed is trimmed past the phone's cursor.
		await jobs.update(l, jobId, (await Job.findByPk(jobId))!.version, { notes: 'Starter relay clicks' });
		await db().query('UPDATE tests SET deleted_at = UTC_TIMESTAMP(3), version = version + 1 WHERE id = ?', { replacements: [gone.testId] });
		expect(await trimFeed(w.workshop.id, 0)).toBeGreaterThan(0);
		expect((await tech.get(`/api/sync/pull?cursor=${oldCursor}`)).status).toBe(400); // version 1 cannot
		const floor = (await db().query<{ f: number }>('SELECT floor_seq AS f FROM change_counters WHERE workshop_id = ?', { replacements: [w.workshop.id], type: QueryTypes.SELECT }))[0].f;
		expect(Number(floor)).toBeGreaterThan(oldCursor);

		// Back online, the pull runs first (as after a failed push): the snapshot replaces the
		// phone's copy but keeps every record with an op still waiting.
		phone.online();
		await phone.engine.pullAll();
		expect(await countOutbox(phone.db)).toBe(6);
		expect(await has(phone.db, 'test', test.id)).toBe(true);
		for (const r of readings) expect(await has(phone.db, 'reading', r.id)).toBe(true);
		expect(await has(phone.db, 'test', gone.testId)).toBe(false); // deleted while away: swept
		const job = await phone.db.get('records', ['job', jobId]);
		expect(job?.data.notes).toBe('Starter relay clicks');

		// Then everything is sent, and the server holds all of it.
		const report = await phone.engine.syncOnce();
		expect(report.state).toBe('idle');
		expect(report.waiting).toBe(0);
		const stored = await db().query<{ id: string }>('SELECT id FROM readings WHERE test_id = ?', { replacements: [test.id], type: QueryTypes.SELECT });
		expect(stored.map((r) => r.id).sort()).toEqual(readings.map((r) => r.id).sort());
		expect(await has(phone.db, 'reading', readings[4].id)).toBe(true);
		expect((await phone.db.get('records', ['reading', readings[4].id]))?.version).toBe(1);
	});
});

describe('what phones keep: the team page', () => {
	it('lets a lead set the windows, says what is wrong in words, and refuses a technician', async () => {
		const w = await makeWorkshop('Windows form');
		const lead = await signedIn(w.users.lead.email);
		expect(await windowsOf(w.workshop.id)).toEqual({ phoneDays: 30, deskDays: 30 });
		const bad = await lead.form('/team?/windows', { phoneDays: 'ten', deskDays: '400' });
		expect(bad.status).toBe(400);
		const text = await bad.text();
		expect(text).toContain('as a whole number');
		expect(text).toContain('At most 365 days');
		expect(await windowsOf(w.workshop.id)).toEqual({ phoneDays: 30, deskDays: 30 });
		expect((await lead.form('/team?/windows', { phoneDays: '14', deskDays: '60' })).status).toBe(200);
		expect(await windowsOf(w.workshop.id)).toEqual({ phoneDays: 14, deskDays: 60 });
		const page = await (await lead.get('/team', 'text/html')).text();
		expect(page).toContain('What phones keep');
		const tech = await signedIn(w.users.technician.email);
		expect((await tech.form('/team?/windows', { phoneDays: '365', deskDays: '365' })).status).toBe(403);
		expect(await windowsOf(w.workshop.id)).toEqual({ phoneDays: 14, deskDays: 60 });
	});
});

describe('pull v2: readings read in two halves', () => {
	it('carries every reading once and in feed order, whatever the page and however the readings lie across jobs', async () => {
		const w = await makeWorkshop('Halves');
		const lib = await library(w);
		const tech = await signedIn(w.users.technician.email);
		const lead = await signedIn(w.users.lead.email);
		// Five jobs: one holds most readings, the others a few or none; pushed interleaved, so
		// the seqs of the jobs mix, and every other job falls in one half (the pull's split).
		const counts = [41, 3, 0, 17, 1];
		const testIds: string[] = [];
		for (const _count of counts) {
			const job = (await jobs.create(w.users.lead.actor, { complaint: 'Misfire on two cylinders', assigneeId: w.users.technician.id })).id as string;
			const t = create('test', { jobId: job, ...lib, meter: METER, temperature: { mode: 'measured', tempC: 20 } });
			expect((await push(tech, 'halves-phone', [t]))[0].status).toBe('applied');
			testIds.push(t.entityId);
		}
		const before = await lastSeq(w.workshop.id);
		const order = counts.flatMap((count, k) => Array.from({ length: count }, () => k));
		let x = 7; // a fixed shuffle (a linear congruential generator), the same every run
		for (let i = order.length - 1; i > 0; i--) {
			x = (x * 1103515245 + 12345) % 2147483648;
			const j = x % (i + 1);
			[order[i], order[j]] = [order[j], order[i]];
		}
		const readings = order.map((k, i) => create('reading', { testId: testIds[k], checkKey: 'primary', samples: [{ value: 0.4 + i / 1000, unit: 'Ω' }] }));
		expect((await push(tech, 'halves-phone', readings)).every((r) => r.status === 'applied')).toBe(true);
		const all = readings.map((r) => r.entityId).sort();

		for (const limit of [1, 2, 3, 5, 8, 13, 64]) {
			for (const [who, c] of [['technician', tech], ['lead', lead]] as const) {
				for (const [how, from] of [['snapshot', 0], ['feed', before]] as const) {
					const got = (await pullV2(c, from, limit)).changes.filter((ch) => ch.entity === 'reading');
					const label = `${who}, ${how}, pages of ${limit}`;
					expect(got.map((ch) => ch.entityId).sort(), label).toEqual(all);
					expect(got.every((ch, i) => i === 0 || ch.seq > got[i - 1].seq), `${label}: in feed order`).toBe(true);
				}
			}
		}
	});
});
