/**
 * The browser side of being signed in, for the offline screens: who the user is (from
 * /api/me when there is signal, else the copy kept from last time), their IndexedDB
 * database, this device's id, and the sync runner (on start, on `online`, on a timer, on
 * "Sync now"; one tab at a time; exponential backoff with jitter after failures).
 */
import { v7 as uuidv7 } from 'uuid';
import { backoffMs, SyncEngine, type SyncReport } from './engine';
import { getMeta, openLocalDb, type LocalDb } from './local-db';
import { countOutbox } from './outbox';
import { syncStatus } from './status.svelte';

export type Me = { id: string; name: string; email: string; role: 'apprentice' | 'technician' | 'lead' | 'owner'; workshopId: string; workshopName: string };
export class NeedsSignIn extends Error {}

const ME_KEY = 'fieldbench:me';
const DEVICE_KEY = 'fieldbench:device';
const TIMER_MS = 30_000;

let current: Promise<{ me: Me; db: LocalDb }> | null = null;
let engine: SyncEngine | null = null;
let failures = 0;
let timer: ReturnType<typeof setTimeout> | null = null;

export function deviceId(): string {
	let id = localStorage.getItem(DEVICE_KEY);
	if (!id) localStorage.setItem(DEVICE_KEY, (id = uuidv7()));
	return id;
}

async function whoAmI(): Promise<Me> {
	const cached = localStorage.getItem(ME_KEY);
	try {
		const r = await fetch('/api/me', { credentials: 'same-origin', signal: AbortSignal.timeout(5000) });
		if (r.status === 401) {
			syncStatus.state = 'signed_out';
			if (cached) return JSON.parse(cached) as Me; // work on; sending waits for sign-in
			throw new NeedsSignIn('Sign in to continue');
		}
		if (r.ok) {
			const { user } = (await r.json()) as { user: Me };
			localStorage.setItem(ME_KEY, JSON.stringify(user));
			return user;
		}
	} catch (e) {
		if (e instanceof NeedsSignIn) throw e;
	}
	if (cached) return JSON.parse(cached) as Me;
	throw new NeedsSignIn('Sign in once with signal to use Fieldbench offline');
}

/** The signed-in user and their local database (opened once per page load). */
export function local(): Promise<{ me: Me; db: LocalDb }> {
	current ??= (async () => {
		const me = await whoAmI();
		const db = await openLocalDb(me.id);
		engine = new SyncEngine(db, deviceId());
		await refreshCounts(db);
		startRunner();
		requestPersistence();
		return { me, db };
	})().catch((e) => {
		current = null;
		throw e;
	});
	return current;
}

/** Forget the cached identity (after sign-out); the user's database stays for next time. */
export function forgetMe() {
	localStorage.removeItem(ME_KEY);
	current = null;
}

export async function refreshCounts(db: LocalDb) {
	syncStatus.waiting = await countOutbox(db);
	syncStatus.issues = await db.count('issues');
	syncStatus.lastSyncAt = (await getMeta<string>(db, 'lastSyncAt')) ?? null;
}

/** Runs `fn` holding the sync lock; skips when another runner holds it, unless `wait`. */
async function runLocked(fn: () => Promise<void>, wait = false) {
	const locks = (navigator as Navigator & { locks?: LockManager }).locks;
	if (!locks) return fn();
	await locks.request('fieldbench-sync', wait ? {} : { ifAvailable: true }, async (lock) => {
		if (lock) await fn();
	});
}

/**
 * Sync now (the button, the timer, the `online` event and every local write call this). The
 * button passes `wait`: when a sync is already running it waits for it and runs once more, so
 * "Sync now" ends only when this phone is up to date; the others skip a sync already running.
 */
export async function syncNow(opts: { wait?: boolean } = {}): Promise<SyncReport | null> {
	if (!engine) return null;
	let report: SyncReport | null = null;
	syncStatus.state = 'syncing';
	await runLocked(async () => {
		report = await engine!.syncOnce();
	}, opts.wait);
	const r = report as SyncReport | null;
	if (r) {
		syncStatus.state = r.state;
		syncStatus.waiting = r.waiting;
		syncStatus.issues = r.issues;
		syncStatus.lastError = r.error ?? null;
		if (r.state === 'idle') syncStatus.lastSyncAt = new Date().toISOString();
		failures = r.state === 'idle' || r.state === 'signed_out' ? 0 : failures + 1;
	} else if (syncStatus.state === 'syncing') syncStatus.state = 'idle'; // another tab is syncing
	// After a failure: back off (exponential, with jitter), and never sooner than the server asked.
	schedule(failures ? Math.max(backoffMs(failures - 1), r?.retryAfterMs ?? 0) : TIMER_MS);
	return r;
}

function schedule(ms: number) {
	if (timer) clearTimeout(timer);
	timer = setTimeout(() => void syncNow(), ms);
}

function startRunner() {
	syncStatus.online = navigator.onLine;
	addEventListener('online', () => {
		syncStatus.online = true;
		failures = 0;
		void syncNow();
	});
	addEventListener('offline', () => (syncStatus.online = false));
	void syncNow();
}

async function requestPersistence() {
	if (!navigator.storage?.persist) return (syncStatus.persisted = false);
	syncStatus.persisted = (await navigator.storage.persisted()) || (await navigator.storage.persist());
}
