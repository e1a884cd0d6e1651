/**
 * The audit log and the change feed, written inside the caller's transaction.
 *
 * `seq` comes from the workshop's row in `change_counters`, incremented with UPDATE: the row
 * lock is held until the writing transaction commits, so a later writer gets a higher seq
 * only after the earlier one committed. A puller reading `seq > cursor` therefore never
 * skips a change that commits late (DESIGN §5).
 */
import { QueryTypes, type Transaction } from 'sequelize';
import { db } from '.';
import type { Actor } from '../auth/types';
import { rawQuery } from './raw';

export type AuditRow = { field: string | null; old: unknown; new: unknown };
export type ChangeInput = {
	entity: string;
	entityId: string;
	version: number;
	op: 'upsert' | 'delete' | 'evict';
	jobId?: string | null;
	audience?: string | null;
	record: Record<string, unknown> | null;
};

const enc = (v: unknown) => (v === undefined || v === null ? null : JSON.stringify(v));

/**
 * Take the next `count` seqs of the workshop (row-locked until commit); returns the first.
 * One round trip: LAST_INSERT_ID(expr) hands the new value back in the statement's answer.
 */
export async function nextSeq(t: Transaction, workshopId: string, count = 1): Promise<number> {
	for (let attempt = 0; attempt < 2; attempt++) {
		const r = await rawQuery<{ affectedRows: number; insertId: number | bigint }>(
			t,
			'UPDATE change_counters SET last_seq = LAST_INSERT_ID(last_seq + ?) WHERE workshop_id = ?',
			[count, workshopId]
		);
		if (r.affectedRows > 0) return Number(r.insertId) - count + 1;
		await rawQuery(t, 'INSERT IGNORE INTO change_counters (workshop_id, last_seq) VALUES (?, 0)', [
			workshopId
		]);
	}
	throw new Error('change counter row missing');
}

/** Append one change row; returns its seq. */
export async function appendChange(
	t: Transaction,
	workshopId: string,
	c: ChangeInput
): Promise<number> {
	const seq = await nextSeq(t, workshopId);
	await db().query(
		`INSERT INTO changes (workshop_id, seq, entity, entity_id, version, op, job_id, audience, record, at)
		 VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, UTC_TIMESTAMP(3))`,
		{
			replacements: [
				workshopId,
				seq,
				c.entity,
				c.entityId,
				c.version,
				c.op,
				c.jobId ?? null,
				c.audience ?? null,
				enc(c.record)
			],
			transaction: t,
			type: QueryTypes.INSERT
		}
	);
	return seq;
}

/** One audit row per field (or one row with no field, e.g. for a delete). */
export async function writeAudit(
	t: Transaction,
	actor: Actor,
	entity: string,
	entityId: string,
	action: string,
	rows: AuditRow[],
	opId: string | null
): Promise<void> {
	const list = rows.length ? rows : [{ field: null, old: null, new: null }];
	const values = list.map(() => '(?, ?, ?, ?, UTC_TIMESTAMP(3), ?, ?, ?, ?, ?, ?)').join(', ');
	const replacements = list.flatMap((r) => [
		actor.workshopId,
		actor.userId,
		actor.deviceId ?? null,
		opId,
		entity,
		entityId,
		action,
		r.field,
		enc(r.old),
		enc(r.new)
	]);
	await db().query(
		`INSERT INTO audit_log (workshop_id, user_id, device_id, op_id, at, entity, entity_id, action, field, old_value, new_value)
		 VALUES ${values}`,
		{ replacements, transaction: t, type: QueryTypes.INSERT }
	);
}
