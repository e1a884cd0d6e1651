/**
 * The phone's sync when the server says no, in Chromium at phone size:
 *  - 2,000 readings queued offline; the session is revoked (the technician signs out on
 *    another device) after the first batches are stored: the badge says to sign in, nothing
 *    is dropped, and after signing in the rest is sent, each op once;
 *  - a 413 halves the batch; a 429 is waited out as long as its Retry-After says; 5xx answers
 *    are retried with growing pauses — these three answers come from playwright's route
 *    interception, as the real server does not give them on demand;
 *  - the same batch sent at the same moment from two tabs of one phone is stored once.
 *
 * The readings are queued by writing the phone's IndexedDB as the app's `writeLocal` does
 * (a record and its outbox entry in one transaction): typing 2,000 readings on the keypad
 * would take the whole test budget. Everything after that is the app's own sync client.
 */
import { QueryTypes, Sequelize } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { afterAll, afterEach, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Page, Route } from 'playwright-core';
import { DEMO_PASSWORD, DEMO_USERS, DEMO_WORKSHOP } from '../../src/lib/server/seed/demo';
import { Client } from '../helpers/http';
import { openPhone, shot, signInAs, watch } from './browser';

const base = inject('baseURL');
// A technician and a job of their own in the demo workshop, so the 2,000 readings never
// weigh on the demo technician's phone in the other end-to-end files.
let JOB = '';
const TECH = `recovery-${uuidv7().slice(-8)}@tallowbridge.example`;
let phone: Awaited<ReturnType<typeof openPhone>>;
let db: Sequelize;

beforeAll(async () => {
	const env = inject('dbEnv');
	db = new Sequelize(env.DB_NAME, env.DB_USER, env.DB_PASSWORD, { host: env.DB_HOST, port: Number(env.DB_PORT), dialect: 'mariadb', logging: false });
	Object.assign(process.env, env);
	const { createUser } = await import('../../src/lib/server/services/workshops');
	const { jobs } = await import('../../src/lib/server/services/jobs');
	const { closeDb } = await import('../../src/lib/server/db');
	const tech = await createUser(DEMO_WORKSHOP.id, { email: TECH, name: 'Recovery Technician', role: 'technician', password: DEMO_PASSWORD });
	const job = await jobs.create({ userId: DEMO_USERS[1].id, workshopId: DEMO_WORKSHOP.id, role: 'lead', deviceId: 'e2e' }, { complaint: 'Flat battery after a night', assigneeId: tech.id });
	JOB = job.id as string;
	await closeDb();
	phone = await openPhone();
	await signInAs(phone, base, TECH);
	await phone.page.waitForFunction(() => Boolean(navigator.serviceWorker.controller), null, { timeout: 20_000 });
});
afterEach(() => {
	expect(phone.errors, 'uncaught errors in the page').toEqual([]);
});
afterAll(async () => {
	await phone?.close();
	await db?.close();
});

const badge = (page: Page = phone.page) => page.getByTestId('sync-badge');

/** A test on the job and `n` readings on it, queued in the phone's IndexedDB as `writeLocal` queues them. */
async function queueReadings(page: Page, n: number) {
	const now = new Date().toISOString();
	const testId = uuidv7();
	const op = (entity: string, entityId: string, fields: Record<string, unknown>) => ({ opId: uuidv7(), entity, entityId, kind: 'create', baseVersion: 0, fields, deviceTime: now });
	const entries = [op('test', testId, { jobId: JOB, position: '3', temperature: { mode: 'measured', tempC: 19 } })];
	for (let i = 0; i < n; i++) entries.push(op('reading', uuidv7(), { testId, checkKey: 'primary', samples: [{ value: 0.4 + (i % 100) / 1000, unit: 'Ω' }] }));
	await page.evaluate(
		async ({ entries, jobId, now }) => {
			const me = JSON.parse(localStorage.getItem('fieldbench:me')!);
			const idb: IDBDatabase = await new Promise((ok, fail) => {
				const r = indexedDB.open(`fieldbench-${me.id}`);
				r.onsuccess = () => ok(r.result);
				r.onerror = () => fail(r.error);
			});
			const tx = idb.transaction(['records', 'outbox'], 'readwrite');
			for (const op of entries) {
				tx.objectStore('records').put({ entity: op.entity, id: op.entityId, version: 0, jobId, data: op.fields, deleted: false, pending: 1, updatedAt: now });
				tx.objectStore('outbox').add({ op, jobId, createdAt: now });
			}
			await new Promise((ok, fail) => {
				tx.oncomplete = ok;
				tx.onerror = () => fail(tx.error);
			});
			idb.close();
		},
		{ entries, jobId: JOB, now }
	);
	return { testId, opIds: entries.map((e) => e.opId) };
}

/** How many entries wait in the phone's outbox, and how many issues it keeps. */
const local = (page: Page = phone.page) =>
	page.evaluate(async () => {
		const me = JSON.parse(localStorage.getItem('fieldbench:me')!);
		const idb: IDBDatabase = await new Promise((ok) => {
			const r = indexedDB.open(`fieldbench-${me.id}`);
			r.onsuccess = () => ok(r.result);
		});
		const count = (store: string) =>
			new Promise<number>((ok) => {
				const r = idb.transaction(store).objectStore(store).count();
				r.onsuccess = () => ok(r.result);
			});
		const out = { waiting: await count('outbox'), issues: await count('issues') };
		idb.close();
		return out;
	});

/** Readings the server holds for a test, and how many distinct op ids they carry. */
async function stored(testId: string) {
	const [row] = await db.query<{ n: number; ops: number }>('SELECT COUNT(*) AS n, COUNT(DISTINCT op_id) AS ops FROM readings WHERE test_id = ?', { replacements: [testId], type: QueryTypes.SELECT });
	return { rows: Number(row.n), ops: Number(row.ops) };
}

/** Push requests seen by the browser: when, how many ops, which, and what came back. */
type Push = { at: number; opIds: string[]; status: number };
function recordPushes(handle: (push: Push, route: Route, seen: Push[]) => Promise<void>) {
	const seen: Push[] = [];
	const handler = async (route: Route) => {
		const body = JSON.parse(route.request().postData() ?? '{}');
		const push: Push = { at: Date.now(), opIds: (body.ops ?? []).map((o: { opId: string }) => o.opId), status: 0 };
		seen.push(push);
		await handle(push, route, seen);
	};
	return { seen, handler };
}
/** Let the request through to the app server (once more after a dropped kept-alive connection). */
async function forward(push: Push, route: Route) {
	try {
		const r = await route.fetch().catch(() => route.fetch());
		push.status = r.status();
		await route.fulfill({ response: r });
	} catch {
		push.status = -1;
		await route.abort('connectionreset'); // the phone sees no connection and tries again later
	}
}
const refuse = (push: Push, route: Route, status: number, headers: Record<string, string> = {}) => {
	push.status = status;
	return route.fulfill({ status, headers: { 'content-type': 'application/json', ...headers }, body: JSON.stringify({ error: { code: 'refused', message: `Answered ${status} on purpose` } }) });
};
/** Each op in exactly one accepted push. */
function sentOnce(seen: Push[], opIds: string[]) {
	const accepted = seen.filter((p) => p.status === 200).flatMap((p) => p.opIds);
	expect(accepted.length).toBe(new Set(accepted).size);
	expect(new Set(accepted)).toEqual(new Set(opIds));
}


describe('the phone when the server says no', () => {
	it('keeps 2,000 readings through a session revoked mid-sync and sends the rest once after signing in', async () => {
		const { page, context } = phone;
		await page.goto(`${base}/field`);
		await context.setOffline(true);
		const { testId, opIds } = await queueReadings(page, 2000);
		await page.reload();
		await expect.poll(() => badge().textContent()).toContain('2001 waiting to send');

		// The first two batches go through; then the technician signs out on another device.
		const { seen, handler } = recordPushes(async (push, route, all) => {
			if (all.length === 3) {
				const elsewhere = new Client(base, '10.20.0.1');
				expect((await elsewhere.signIn(TECH, DEMO_PASSWORD)).status).toBe(303);
				expect((await elsewhere.form('/sign-out', {})).status).toBe(303);
			}
			await forward(push, route);
		});
		await context.route('**/api/sync/push', handler);
		await context.setOffline(false); // the runner sends on `online`, or at its next try after the offline one
		await expect.poll(() => badge().textContent(), { timeout: 30_000 }).toContain('Sign in to send');
		expect(seen.map((p) => [p.opIds.length, p.status])).toEqual([[500, 200], [500, 200], [500, 401]]);
		expect(await local()).toEqual({ waiting: 1001, issues: 0 });
		expect(await stored(testId)).toEqual({ rows: 999, ops: 999 });
		await shot(page, 'recovery-1-sign-in-to-send');

		await signInAs(phone, base, TECH);
		await expect.poll(() => badge().textContent(), { timeout: 30_000 }).toContain('All sent');
		expect(await local()).toEqual({ waiting: 0, issues: 0 });
		expect(await stored(testId)).toEqual({ rows: 2000, ops: 2000 });
		sentOnce(seen, opIds);
		await context.unroute('**/api/sync/push', handler);
	});

	it('halves the batch after a 413 and sends everything once', async () => {
		const { page, context } = phone;
		const { seen, handler } = recordPushes((push, route) => (push.opIds.length > 250 ? refuse(push, route, 413) : forward(push, route)));
		await context.route('**/api/sync/push', handler);
		const { testId, opIds } = await queueReadings(page, 999);
		await page.reload(); // the runner starts with the page and sends
		await expect.poll(() => badge().textContent(), { timeout: 30_000 }).toContain('All sent');
		expect(seen.map((p) => [p.opIds.length, p.status])).toEqual([[500, 413], [250, 200], [250, 200], [250, 200], [250, 200]]);
		expect(await stored(testId)).toEqual({ rows: 999, ops: 999 });
		sentOnce(seen, opIds);
		await context.unroute('**/api/sync/push', handler);
	});

	it('waits as long as a 429 says before sending again', async () => {
		const { page, context } = phone;
		const { seen, handler } = recordPushes((push, route, all) => (all.length === 1 ? refuse(push, route, 429, { 'retry-after': '3' }) : forward(push, route)));
		await context.route('**/api/sync/push', handler);
		const { testId, opIds } = await queueReadings(page, 199);
		await page.reload();
		await expect.poll(() => badge().textContent()).toContain('200 waiting to send');
		await expect.poll(() => badge().textContent(), { timeout: 30_000 }).toContain('All sent');
		expect(seen.map((p) => p.status)).toEqual([429, 200]);
		expect(seen[1].at - seen[0].at).toBeGreaterThanOrEqual(3000);
		expect(await stored(testId)).toEqual({ rows: 199, ops: 199 });
		sentOnce(seen, opIds);
		await context.unroute('**/api/sync/push', handler);
	});

	it('retries after 5xx answers with growing pauses, and sends everything once', async () => {
		const { page, context } = phone;
		const { seen, handler } = recordPushes((push, route, all) => (all.length <= 3 ? refuse(push, route, 503) : forward(push, route)));
		await context.route('**/api/sync/push', handler);
		const { testId, opIds } = await queueReadings(page, 99);
		await page.reload();
		await expect.poll(() => badge().textContent(), { timeout: 45_000 }).toContain('All sent');
		expect(seen.map((p) => p.status)).toEqual([503, 503, 503, 200]);
		// Exponential back-off with jitter: the n-th wait is at least half of 1 s × 2ⁿ.
		const gaps = seen.slice(1).map((p, i) => p.at - seen[i].at);
		expect(gaps[0]).toBeGreaterThanOrEqual(500);
		expect(gaps[1]).toBeGreaterThanOrEqual(1000);
		expect(gaps[2]).toBeGreaterThanOrEqual(2000);
		expect(await stored(testId)).toEqual({ rows: 99, ops: 99 });
		sentOnce(seen, opIds);
		await context.unroute('**/api/sync/push', handler);
	});

	it('stores a batch sent at the same moment from two tabs once, and the two runners send each op once', async () => {
		const { page, context } = phone;
		await context.setOffline(true);
		const { testId, opIds } = await queueReadings(page, 599);
		const second = await context.newPage();
		watch(second, phone.errors);
		// The second tab opens offline, from the service worker; the first is the one already
		// open. (Navigating that one offline too sometimes left its requests unseen by the
		// browser's interception: neither the route nor a request listener saw them.)
		await second.goto(`${base}/field`);
		// Back online the runners send; their pushes are held back until both tabs have sent.
		let holding = true;
		const held: (() => void)[] = [];
		const { seen, handler } = recordPushes(async (push, route, all) => {
			if (route.request().headers()['x-both-tabs']) {
				all.splice(all.indexOf(push), 1); // the tabs' own sends are judged by their answers
				return route.continue();
			}
			if (holding) await new Promise<void>((go) => held.push(go));
			await forward(push, route);
		});
		await context.route('**/api/sync/push', handler);
		await context.setOffline(false);

		// The same first batch, sent by both tabs at once, as a runner would send it.
		const batch = await page.evaluate(async () => {
			const me = JSON.parse(localStorage.getItem('fieldbench:me')!);
			const idb: IDBDatabase = await new Promise((ok) => {
				const r = indexedDB.open(`fieldbench-${me.id}`);
				r.onsuccess = () => ok(r.result);
			});
			const all = await new Promise<{ op: unknown }[]>((ok) => {
				const r = idb.transaction('outbox').objectStore('outbox').getAll(null, 300);
				r.onsuccess = () => ok(r.result);
			});
			idb.close();
			return JSON.stringify({ deviceId: localStorage.getItem('fieldbench:device'), ops: all.map((e) => e.op) });
		});
		const send = (tab: Page) =>
			tab.evaluate(async (body) => {
				const r = await fetch('/api/sync/push', { method: 'POST', headers: { 'content-type': 'application/json', 'x-both-tabs': '1' }, body });
				const answer = await r.json();
				return { status: r.status, results: (answer.results ?? [JSON.stringify(answer)]).map((x: { status: string }) => x.status ?? x) };
			}, batch);
		const [one, two] = await Promise.all([send(page), send(second)]);
		expect([one.status, two.status]).toEqual([200, 200]);
		const statuses = [...one.results, ...two.results];
		expect(statuses.filter((s) => s === 'applied')).toHaveLength(300);
		expect(statuses.filter((s) => s === 'duplicate')).toHaveLength(300);
		expect(await stored(testId)).toEqual({ rows: 299, ops: 299 });

		// The runners' pushes go on: one tab at a time (navigator.locks), each op sent once.
		holding = false;
		held.forEach((go) => go());
		await expect.poll(() => local(), { timeout: 30_000 }).toEqual({ waiting: 0, issues: 0 });
		const pushed = seen.flatMap((p) => p.opIds);
		expect(pushed.length).toBe(new Set(pushed).size);
		expect(new Set(pushed)).toEqual(new Set(opIds));
		expect(await stored(testId)).toEqual({ rows: 599, ops: 599 });
		await second.close();
		await context.unroute('**/api/sync/push', handler);
	});
});
