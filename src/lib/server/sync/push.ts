/**
 * POST /api/sync/push, after the route checked sign-in (401), size (413) and schema (400):
 *  1. one transaction for the batch; first lock this device's row in `sync_devices` (a
 *     second push from the same device — a retry sent while the first is still running —
 *     waits until the first commits, so it sees the first's ops as duplicates); then look
 *     up every opId in the ledger (`sync_ops`);
 *  2. ops in the order sent: a seen opId answers `duplicate` with the first answer and
 *     changes nothing; a run of append-only creates is applied in bulk inside one savepoint,
 *     trusting the unique keys to catch a stored record (see `applyRun`); a mutable op is
 *     applied inside its own savepoint through its aggregate's service;
 *  3. an op that throws is rolled back alone and answered `rejected: server_error`, and so is
 *     every op after it in the batch, unapplied: the phone keeps them in order and sends them
 *     again (an op after it may depend on it — a reading on the test that failed);
 *  4. the first answers go into the ledger in the same transaction as their effects.
 * When MariaDB ends the whole transaction (a deadlock between two pushes) the push starts
 * again from step 1, a few times, before answering 500.
 */
import type { Transaction } from 'sequelize';
import { rawQuery } from '../db/raw';
import type { SessionUser } from '../auth/types';
import { db } from '../db';
import { isAppendOnly, type Op, type PushBody, type PushResult } from '../../sync/protocol';
import { applyAppendOps, hasRow, insertAppendOps, isDuplicateKey, prepareAppendOps, withoutRow, type PreparedOp } from './append';
import { findSeen, findStored, remember } from './ledger';
import { applyMutableOp } from './mutable';

const savepoint = <T>(t: Transaction, fn: (sp: Transaction) => Promise<T>) =>
	db().transaction({ transaction: t }, fn);

const failed = (op: Op): PushResult => ({ opId: op.opId, status: 'rejected', reason: 'server_error' });
const isFailed = (r: PushResult) => r.status === 'rejected' && r.reason === 'server_error';

/**
 * Errors after which the transaction is gone or must not go on: a deadlock (1213, InnoDB
 * rolls the whole transaction back) or a lock wait timeout (1205).
 */
export function endsTransaction(e: unknown): boolean {
	const err = e as { errno?: number; parent?: { errno?: number }; original?: { errno?: number } } | null;
	const errno = err?.errno ?? err?.parent?.errno ?? err?.original?.errno;
	return errno === 1213 || errno === 1205;
}
/** Transactions that met such an error: their push starts again. */
const lost = new WeakSet<Transaction>();
/** Rethrow an error that ends the transaction (marking it); log any other. */
function unlessLost(t: Transaction, e: unknown, what: string) {
	if (endsTransaction(e)) {
		lost.add(t);
		throw e;
	}
	console.error(what, e);
}

type AppendActor = Parameters<typeof applyAppendOps>[0];

/**
 * A run of append-only creates, op by op, each in its own savepoint (after a failure); after
 * an op fails the rest are not applied (they are answered `server_error` and come again).
 */
async function oneByOne(actor: AppendActor, run: Op[], t: Transaction) {
	const out: PushResult[] = [];
	for (const op of run) {
		if (out.some(isFailed)) {
			out.push(failed(op));
			continue;
		}
		try {
			out.push(...(await savepoint(t, (sp) => applyAppendOps(actor, [op], sp))));
		} catch (e) {
			unlessLost(t, e, 'sync: append op failed');
			out.push(failed(op));
		}
	}
	return out;
}

/**
 * A run of append-only creates (none of them in the ledger). The rows are built first (no
 * lock taken), then inserted in bulk without looking the ids up — new records are the rule,
 * and the tables' unique keys refuse a taken id or op id. On a duplicate key the savepoint is
 * rolled back and the same rows go again with the lookups: ops whose record is stored answer
 * `duplicate`, the rest go through the id checks. An op refused while its row was built (its
 * job reassigned since, say) is looked up too, so a stored record always answers
 * `duplicate`. When the batch looks sent again (`likelyStored`), the lookups come first. Any
 * other failure, or a second one: op by op.
 */
async function applyRun(actor: AppendActor, run: Op[], t: Transaction, likelyStored: boolean): Promise<PushResult[]> {
	if (likelyStored) return applyChecked(actor, run, null, t);
	let prepared: PreparedOp[];
	try {
		prepared = await prepareAppendOps(actor, run, t);
	} catch (e) {
		unlessLost(t, e, 'sync: append run failed');
		return run.length === 1 ? [failed(run[0])] : oneByOne(actor, run, t);
	}
	const refused = run.filter((_, i) => !hasRow(prepared[i]));
	const stored = refused.length ? await findStored(refused, t) : new Map<string, PushResult>();
	try {
		const out = await savepoint(t, (sp) => insertAppendOps(actor, prepared, sp, { checkIds: false }));
		return out.map((r, i) => {
			const first = stored.get(run[i].opId);
			return first ? duplicateOf(first) : r;
		});
	} catch (e) {
		if (!isDuplicateKey(e)) {
			unlessLost(t, e, 'sync: append run failed');
			return run.length === 1 ? [failed(run[0])] : oneByOne(actor, run, t);
		}
	}
	return applyChecked(actor, run, prepared, t);
}

/**
 * The careful way: ops whose record is stored answer `duplicate`; the rest (their rows as
 * already built, when given) go in with the id checks, or op by op after a failure.
 */
async function applyChecked(actor: AppendActor, run: Op[], prepared: PreparedOp[] | null, t: Transaction) {
	const stored = await findStored(run, t);
	const fresh = run.filter((op) => !stored.has(op.opId));
	let applied: PushResult[] = [];
	if (fresh.length) {
		try {
			const rows = prepared
				? prepared.filter((_, i) => !stored.has(run[i].opId))
				: await prepareAppendOps(actor, fresh, t);
			applied = await savepoint(t, (sp) => insertAppendOps(actor, rows, sp));
		} catch (e) {
			unlessLost(t, e, 'sync: append run failed');
			applied = await oneByOne(actor, fresh, t);
		}
	}
	let k = 0;
	return run.map((op) => {
		const first = stored.get(op.opId);
		return first ? duplicateOf(first) : applied[k++];
	});
}

/** The answer to an op seen before: its first answer, marked `duplicate`. */
const duplicateOf = (first: PushResult): PushResult => ({
	...first,
	status: 'duplicate',
	firstStatus: first.status as never
});

/** Apply a push (see the steps above), starting again when MariaDB ended its transaction. */
export async function pushOps(user: SessionUser, body: PushBody): Promise<PushResult[]> {
	for (let attempt = 1; ; attempt++) {
		let tried: Transaction | null = null;
		try {
			return await pushOnce(user, body, (t) => (tried = t));
		} catch (e) {
			const again = (tried && lost.has(tried)) || endsTransaction(e);
			if (!again || attempt >= 5) throw e;
			await new Promise((r) => setTimeout(r, Math.random() * 40 * attempt));
		}
	}
}

async function pushOnce(user: SessionUser, body: PushBody, started: (t: Transaction) => void): Promise<PushResult[]> {
	return db().transaction(async (t) => {
		started(t);
		// The device's row first (the lock), then the ledger: sent together, run in this order.
		const probe = body.ops.find((o) => isAppendOnly(o.entity) && o.kind === 'create');
		const [, { seen, probeStored }] = await Promise.all([
			rawQuery(
				t,
				`INSERT INTO sync_devices (device_id, workshop_id, user_id, last_push_at) VALUES (?, ?, ?, UTC_TIMESTAMP(3))
				 ON DUPLICATE KEY UPDATE user_id = VALUES(user_id), last_push_at = VALUES(last_push_at)`,
				[body.deviceId, user.workshopId, user.id]
			),
			// The first append-only create is probed in its table: stored means a batch sent again.
			findSeen([...new Set(body.ops.map((o) => o.opId))], t, probe)
		]);
		const results: PushResult[] = [];
		const toRemember: { op: Op; result: PushResult }[] = [];
		const actorFor = (op: Op) => ({
			userId: user.id,
			workshopId: user.workshopId,
			role: user.role,
			deviceId: body.deviceId,
			deviceTime: new Date(op.deviceTime)
		});
		const ops = body.ops;
		for (let i = 0; i < ops.length; ) {
			if (results.some(isFailed)) {
				// An op failed: the rest wait for the phone to send them again, in order.
				results.push(...ops.slice(i).map(failed));
				break;
			}
			const first = seen.get(ops[i].opId);
			if (first) {
				results.push(duplicateOf(first));
				i++;
				continue;
			}
			if (isAppendOnly(ops[i].entity) && ops[i].kind === 'create') {
				let j = i;
				const run: Op[] = [];
				const inRun = new Set<string>();
				while (j < ops.length && isAppendOnly(ops[j].entity) && ops[j].kind === 'create' && !seen.has(ops[j].opId) && !inRun.has(ops[j].opId)) {
					inRun.add(ops[j].opId);
					run.push(ops[j++]);
				}
				const out = await applyRun(actorFor(ops[i]), run, t, probeStored);
				run.forEach((op, k) => {
					if (out[k].status === 'duplicate') {
						const { firstStatus, ...first } = out[k];
						seen.set(op.opId, { ...first, status: firstStatus! });
						return;
					}
					seen.set(op.opId, out[k]);
					if (out[k].status === 'rejected' || withoutRow.has(out[k])) toRemember.push({ op, result: out[k] });
				});
				results.push(...out);
				i = j;
				continue;
			}
			const op = ops[i++];
			let result: PushResult;
			if (isAppendOnly(op.entity)) {
				result = { opId: op.opId, status: 'rejected', reason: 'append_only' };
			} else {
				try {
					result = await savepoint(t, (sp) => applyMutableOp(actorFor(op), op, sp));
				} catch (e) {
					unlessLost(t, e, 'sync: op failed');
					result = failed(op);
				}
			}
			seen.set(op.opId, result);
			toRemember.push({ op, result });
			results.push(result);
		}
		await remember(
			{ userId: user.id, workshopId: user.workshopId, role: user.role },
			body.deviceId,
			toRemember,
			t
		);
		return results;
	});
}
