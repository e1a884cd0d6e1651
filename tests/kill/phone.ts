/**
 * A simulated phone: the browser's own sync client (`src/lib/client`: local-db, outbox,
 * engine) over its own IndexedDB (a fake-indexeddb factory of its own), signed in as one
 * user, talking to whichever app server the "load balancer" picks for each request.
 *
 * It writes as a technician does — a test on one of its jobs, readings on it, spark tests,
 * edits of its jobs and tests — while a separate loop syncs as the page's runner does (after
 * writes, on a timer, backing off after failures). Every op it queues is kept in `made`.
 */
import 'fake-indexeddb/auto';
import { IDBFactory } from 'fake-indexeddb';
import { backoffMs, SyncEngine, type SyncReport } from '../../src/lib/client/engine';
import { openLocalDb, type LocalDb } from '../../src/lib/client/local-db';
import { countOutbox, writeLocal, type LocalWrite } from '../../src/lib/client/outbox';
import type { Op } from '../../src/lib/sync/protocol';
import type { Rng } from './rng';

export type PhoneUser = { id: string; email: string; role: string; jobs: string[] };
export type World = { componentId: string; sheetId: string; checkKeys: string[]; password: string };
type PickServer = () => { url: string; inflight: number };

/** Open the user's database in a factory of its own (one IndexedDB per phone). */
export async function openPhoneDb(userId: string): Promise<LocalDb> {
	const g = globalThis as { indexedDB: IDBFactory };
	const previous = g.indexedDB;
	g.indexedDB = new IDBFactory();
	try {
		return await openLocalDb(userId); // indexedDB.open runs synchronously inside
	} finally {
		g.indexedDB = previous;
	}
}

export class Phone {
	readonly made: Op[] = [];
	readonly deviceId: string;
	cookie = '';
	db!: LocalDb;
	engine!: SyncEngine;
	syncs = 0;
	failures = 0;
	private tests: { id: string; jobId: string }[] = [];

	constructor(
		readonly user: PhoneUser,
		readonly world: World,
		private pick: PickServer,
		private rng: Rng
	) {
		this.deviceId = `kill-phone-${user.role}-${user.id.slice(-4)}`;
	}

	/** Sign in through the form (any live server), then open the phone's database. */
	async start(): Promise<void> {
		for (let attempt = 0; !this.cookie; attempt++) {
			const base = this.pick().url;
			try {
				const r = await fetch(`${base}/sign-in`, {
					method: 'POST',
					headers: { origin: base, accept: 'text/html', 'content-type': 'application/x-www-form-urlencoded' },
					body: new URLSearchParams({ email: this.user.email, password: this.world.password }),
					redirect: 'manual',
					signal: AbortSignal.timeout(20_000)
				});
				const set = r.headers.getSetCookie().find((c) => c.startsWith('fb_session=') || c.startsWith('__Host-fb_session='));
				if (r.status === 303 && set) this.cookie = set.split(';')[0];
			} catch {
				/* that server is down: try again */
			}
			if (!this.cookie) {
				if (attempt > 200) throw new Error(`${this.user.email} could not sign in`);
				await sleep(250);
			}
		}
		this.db = await openPhoneDb(this.user.id);
		this.engine = new SyncEngine(this.db, this.deviceId, (url, init) => this.fetch(url, init));
		await this.drain(); // the first sync brings the phone its jobs
	}

	/** The page's fetch: same-origin credentials become this phone's cookie on the picked server. */
	private async fetch(url: string, init: RequestInit = {}): Promise<Response> {
		const server = this.pick();
		const headers = new Headers(init.headers);
		headers.set('cookie', this.cookie);
		headers.set('origin', server.url);
		server.inflight++;
		try {
			return await fetch(server.url + url, { ...init, headers, signal: AbortSignal.timeout(30_000) });
		} finally {
			server.inflight--;
		}
	}

	/** A local write (record and outbox entry in one transaction); its op is kept in `made`. */
	private async write(w: LocalWrite) {
		const record = await writeLocal(this.db, w);
		const last = await this.db.transaction('outbox').store.openCursor(null, 'prev');
		this.made.push(last!.value.op);
		return record;
	}

	/** One burst of work: a new test with readings, more readings, a spark test or an edit. */
	async work(): Promise<void> {
		const { rng, world } = this;
		const jobId = rng.pick(this.user.jobs);
		const roll = rng.next();
		if (!this.tests.length || roll < 0.1) {
			const test = await this.write({
				entity: 'test',
				kind: 'create',
				jobId,
				fields: {
					jobId,
					componentId: world.componentId,
					sheetId: world.sheetId,
					position: String(rng.int(1, 6)),
					meter: { name: 'Bench meter', ranges: [{ label: '200 Ω', resolution: 0.01, pctOfReading: 0.5, counts: 2 }], leadResistance: 0.1, relativeMode: false },
					temperature: { mode: 'measured', tempC: rng.int(5, 40) }
				}
			});
			this.tests.push({ id: test.id, jobId });
		}
		const test = rng.pick(this.tests);
		if (roll < 0.75) {
			for (let i = rng.int(5, 60); i > 0; i--) {
				await this.write({
					entity: 'reading',
					kind: 'create',
					jobId: test.jobId,
					fields: {
						testId: test.id,
						checkKey: rng.pick(world.checkKeys),
						samples: [{ value: Math.round(rng.next() * 300) / 100 + 0.2, unit: 'Ω' }],
						rangeLabel: '200 Ω'
					}
				});
			}
		} else if (roll < 0.83) {
			await this.write({
				entity: 'spark_test',
				kind: 'create',
				jobId: test.jobId,
				fields: { jobId: test.jobId, testId: test.id, position: String(rng.int(1, 6)), gapMm: 7, outcome: rng.pick(['go', 'weak', 'none']) }
			});
		} else if (roll < 0.95) {
			const field = rng.pick(['notes', 'location', 'complaint']);
			const value = `${field === 'location' ? 'Bay' : 'Note'} ${rng.int(1, 1_000_000)}`;
			await this.write({ entity: 'job', id: jobId, kind: 'patch', jobId, fields: { [field]: value } });
		} else {
			await this.write({ entity: 'test', id: test.id, kind: 'patch', jobId: test.jobId, fields: { notes: `Checked again ${rng.int(1, 1_000_000)}` } });
		}
	}

	/** One sync round, as the page's runner does it. */
	async syncOnce(): Promise<SyncReport> {
		const r = await this.engine.syncOnce();
		this.syncs++;
		if (r.state === 'error' || r.state === 'signed_out') throw new Error(`${this.user.email}: sync ${r.state}: ${r.error}`);
		this.failures = r.state === 'idle' ? 0 : this.failures + 1;
		return r;
	}

	/** Sync on a short timer (backing off after failures, capped at 2 s) until `until()` says stop. */
	async syncLoop(until: () => boolean): Promise<void> {
		while (!until()) {
			await this.syncOnce();
			await sleep(this.failures ? Math.min(2000, backoffMs(this.failures - 1, () => this.rng.next())) : this.rng.int(100, 800));
		}
	}

	/** Sync until nothing waits and a round ends idle (servers up by now). */
	async drain(maxRounds = 400): Promise<void> {
		for (let i = 0; i < maxRounds; i++) {
			const r = await this.syncOnce();
			if (r.state === 'idle' && (await countOutbox(this.db)) === 0) return;
			await sleep(250);
		}
		throw new Error(`${this.user.email}: the outbox did not drain`);
	}
}

export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
