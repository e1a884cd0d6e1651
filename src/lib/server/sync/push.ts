/**
 * POST /api/sync/push, after the route checked sign-in (401), size (413) and schema (400):
 *  1. one transaction for the batch; first lock this device's row in `sync_devices` (a
 *     second push from the same device — a retry sent while the first is still running —
 *     waits until the first commits, so it sees the first's ops as duplicates); then look
 *     up every opId in the ledger;
 *  2. ops in the order sent: a seen opId answers `duplicate` with the first answer and
 *     changes nothing; a run of append-only creates is applied in bulk inside one savepoint
 *     (if that fails unexpectedly, op by op, each in its own savepoint); a mutable op is
 *     applied inside its own savepoint through its aggregate's service;
 *  3. an op that throws is rolled back alone and answered `rejected: server_error`;
 *  4. the first answers go into the ledger in the same transaction as their effects.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import type { SessionUser } from '../auth/types';
import { db } from '../db';
import { isAppendOnly, type Op, type PushBody, type PushResult } from '../../sync/protocol';
import { applyAppendOps } from './append';
import { findSeen, remember } from './ledger';
import { applyMutableOp } from './mutable';

const savepoint = <T>(t: Transaction, fn: (sp: Transaction) => Promise<T>) =>
	db().transaction({ transaction: t }, fn);

const failed = (op: Op): PushResult => ({ opId: op.opId, status: 'rejected', reason: 'server_error' });

async function applyRun(actor: Parameters<typeof applyAppendOps>[0], run: Op[], t: Transaction) {
	try {
		return await savepoint(t, (sp) => applyAppendOps(actor, run, sp));
	} catch (e) {
		if (run.length === 1) {
			console.error('sync: append op failed', e);
			return [failed(run[0])];
		}
		const out: PushResult[] = [];
		for (const op of run) out.push(...(await applyRun(actor, [op], t)));
		return out;
	}
}

export async function pushOps(user: SessionUser, body: PushBody): Promise<PushResult[]> {
	return db().transaction(async (t) => {
		await db().query(
			`INSERT INTO sync_devices (device_id, workshop_id, user_id, last_push_at) VALUES (?, ?, ?, UTC_TIMESTAMP(3))
			 ON DUPLICATE KEY UPDATE user_id = VALUES(user_id), last_push_at = VALUES(last_push_at)`,
			{ replacements: [body.deviceId, user.workshopId, user.id], type: QueryTypes.INSERT, transaction: t }
		);
		const seen = await findSeen(body.ops, t);
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
			const first = seen.get(ops[i].opId);
			if (first) {
				results.push({ ...first, status: 'duplicate', firstStatus: first.status as never });
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
				const out = await applyRun(actorFor(ops[i]), run, t);
				run.forEach((op, k) => {
					seen.set(op.opId, out[k]);
					if (out[k].status === 'rejected') toRemember.push({ op, result: out[k] });
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
					console.error('sync: op failed', e);
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
