/**
 * What must hold after the storm, checked against MariaDB and the phones' own databases:
 *  - every op made on a phone is in the ledger exactly once (a mutable op's row in `sync_ops`,
 *    an append-only record's op id on its own row), accepted, and nothing else is there;
 *  - every outbox is empty and no phone holds an issue;
 *  - the change feed (the `changes` rows and the append-only rows, which carry their own seq)
 *    holds every seq from 1 to the workshop's counter once: no gap, no duplicate;
 *  - every phone's copy equals what a fresh phone of the same user pulls from nothing, and
 *    each record's version equals the row's version in MariaDB.
 */
import { QueryTypes } from 'sequelize';
import { SyncEngine } from '../../src/lib/client/engine';
import type { LocalDb, LocalRecord } from '../../src/lib/client/local-db';
import { countOutbox } from '../../src/lib/client/outbox';
import { db } from '../../src/lib/server/db';
import { APPEND_TABLES } from '../../src/lib/server/db/append-tables';
import type { Op } from '../../src/lib/sync/protocol';
import { openPhoneDb, type Phone } from './phone';

export type Verdict = {
	ops: number;
	stored: number;
	lost: number;
	duplicated: number;
	refused: number;
	phantom: number;
	feed: { last: number; gaps: number; duplicates: number };
	outboxLeft: number;
	issues: number;
	converged: number;
	phones: number;
	problems: string[];
};

const select = <T extends object>(sql: string, replacements: unknown[]) =>
	db().query<T>(sql, { replacements, type: QueryTypes.SELECT });

/** JSON with sorted keys, so two records compare by content. */
function canonical(v: unknown): string {
	return JSON.stringify(v, (_k, x) =>
		x && typeof x === 'object' && !Array.isArray(x) ? Object.fromEntries(Object.entries(x).sort(([a], [b]) => a.localeCompare(b))) : x
	);
}

/**
 * A fresh phone's copy comes from a snapshot of the stored rows, where a field never set is
 * null; the feed's record of a create leaves such a field out. Both mean "no value" to the
 * phone, so a null field counts as an absent one; any value still has to be equal.
 */
const present = (data: Record<string, unknown>) => Object.fromEntries(Object.entries(data).filter(([, v]) => v !== null));
const shape = (r: LocalRecord) => canonical({ version: r.version, deleted: r.deleted, jobId: r.jobId, data: present(r.data), pending: r.pending });
async function recordsOf(local: LocalDb) {
	return new Map((await local.getAll('records')).map((r) => [`${r.entity}:${r.id}`, r]));
}

async function checkLedger(workshopId: string, made: Op[], v: Verdict) {
	const byOp = new Map(made.map((o) => [o.opId, o]));
	const rows = await select<{ op_id: string; result: string | null }>(
		[
			'SELECT op_id, result FROM sync_ops WHERE workshop_id = ?',
			...Object.values(APPEND_TABLES).map((t) => `SELECT op_id, NULL AS result FROM ${t} WHERE workshop_id = ? AND op_id IS NOT NULL`)
		].join(' UNION ALL '),
		Array(1 + Object.keys(APPEND_TABLES).length).fill(workshopId)
	);
	const seen = new Map<string, number>();
	for (const r of rows) {
		seen.set(r.op_id, (seen.get(r.op_id) ?? 0) + 1);
		if (!byOp.has(r.op_id)) v.phantom++;
		const result = r.result ? JSON.parse(r.result) : { status: 'applied' };
		if (result.status === 'rejected' || result.status === 'conflict') {
			v.refused++;
			v.problems.push(`op ${r.op_id} (${byOp.get(r.op_id)?.entity}) answered ${result.status} ${result.reason ?? ''} ${result.message ?? ''}`);
		}
	}
	for (const op of made) {
		const n = seen.get(op.opId) ?? 0;
		if (n === 0) {
			v.lost++;
			if (v.lost <= 5) v.problems.push(`op ${op.opId} (${op.entity} ${op.kind}) is not stored`);
		} else {
			v.stored++;
			if (n > 1) v.duplicated += n - 1;
		}
	}
	// An append-only record stored twice under two op ids would show as two rows with one id.
	for (const table of Object.values(APPEND_TABLES)) {
		const [d] = await select<{ n: number }>(`SELECT COUNT(*) - COUNT(DISTINCT id) AS n FROM ${table} WHERE workshop_id = ?`, [workshopId]);
		v.duplicated += Number(d.n);
	}
	if (v.phantom) v.problems.push(`${v.phantom} op(s) in the ledger that no phone made`);
}

async function checkFeed(workshopId: string, v: Verdict) {
	const [{ last_seq }] = await select<{ last_seq: number }>('SELECT last_seq FROM change_counters WHERE workshop_id = ?', [workshopId]);
	const tables = ['changes', ...Object.values(APPEND_TABLES)];
	const rows = await select<{ seq: number }>(tables.map((t) => `SELECT seq FROM ${t} WHERE workshop_id = ?`).join(' UNION ALL '), tables.map(() => workshopId));
	const counts = new Map<number, number>();
	for (const r of rows) counts.set(Number(r.seq), (counts.get(Number(r.seq)) ?? 0) + 1);
	v.feed.last = Number(last_seq);
	for (let s = 1; s <= v.feed.last; s++) {
		const n = counts.get(s) ?? 0;
		if (n === 0) v.feed.gaps++;
		if (n > 1) v.feed.duplicates += n - 1;
	}
	const beyond = [...counts.keys()].filter((s) => s < 1 || s > v.feed.last).length;
	v.feed.gaps += beyond;
	if (v.feed.gaps || v.feed.duplicates) v.problems.push(`feed 1..${v.feed.last}: ${v.feed.gaps} gap(s), ${v.feed.duplicates} duplicate(s)`);
}

/** A fresh phone of the same user pulls everything; the phone's copy must be the same. */
async function checkConverged(phone: Phone, pull: (cookie: string) => (url: string, init?: RequestInit) => Promise<Response>, v: Verdict) {
	const fresh = await openPhoneDb(phone.user.id);
	await new SyncEngine(fresh, `${phone.deviceId}-fresh`, pull(phone.cookie)).pullAll();
	const want = await recordsOf(fresh);
	const have = await recordsOf(phone.db);
	const diffs: string[] = [];
	for (const [key, r] of want) if (!have.has(key) || shape(have.get(key)!) !== shape(r)) diffs.push(key);
	for (const key of have.keys()) if (!want.has(key)) diffs.push(key);
	// The versions must be the server's own, row by row.
	for (const entity of ['job', 'test'] as const) {
		const ids = [...have.values()].filter((r) => r.entity === entity).map((r) => r.id);
		if (!ids.length) continue;
		const rows = await select<{ id: string; version: number }>(`SELECT id, version FROM ${entity === 'job' ? 'jobs' : 'tests'} WHERE id IN (?)`, [ids]);
		for (const row of rows) if (have.get(`${entity}:${row.id}`)!.version !== row.version) diffs.push(`${entity}:${row.id} version`);
	}
	fresh.close();
	if (diffs.length) v.problems.push(`${phone.user.email}: ${diffs.length} record(s) differ from a fresh pull, e.g. ${diffs.slice(0, 3).join(', ')}`);
	else v.converged++;
}

export async function verify(
	workshopId: string,
	phones: Phone[],
	pull: (cookie: string) => (url: string, init?: RequestInit) => Promise<Response>
): Promise<Verdict> {
	const made = phones.flatMap((p) => p.made);
	const v: Verdict = { ops: made.length, stored: 0, lost: 0, duplicated: 0, refused: 0, phantom: 0, feed: { last: 0, gaps: 0, duplicates: 0 }, outboxLeft: 0, issues: 0, converged: 0, phones: phones.length, problems: [] };
	for (const p of phones) {
		v.outboxLeft += await countOutbox(p.db);
		v.issues += await p.db.count('issues');
	}
	if (v.outboxLeft) v.problems.push(`${v.outboxLeft} op(s) still in the outboxes`);
	if (v.issues) v.problems.push(`${v.issues} issue(s) kept on the phones`);
	await checkLedger(workshopId, made, v);
	await checkFeed(workshopId, v);
	for (const p of phones) await checkConverged(p, pull, v);
	return v;
}

export function failed(v: Verdict): boolean {
	return v.problems.length > 0 || v.lost > 0 || v.duplicated > 0 || v.converged < v.phones || v.stored !== v.ops;
}
