/**
 * The sync operation ledger: the first answer per opId. Mutable ops and every rejection
 * are stored in `sync_ops`; an applied append-only record keeps its opId on its own row
 * (one row per reading), and its first answer is rebuilt from that row.
 *
 * Both run once per push, on the transaction's driver connection (the sync hot path).
 */
import type { Transaction } from 'sequelize';
import { rawQuery } from '../db/feed';
import type { Actor } from '../auth/types';
import type { Op, PushResult } from '../../sync/protocol';
import { APPEND_TABLES, type StoredAppendEntity } from './append-tables';

/**
 * First answers for the ops already seen, by opId: one query over the ledger (every opId)
 * and, for append-only ops, the table of their own entity (an opId names one op, so it is
 * looked for where that op's record lives); a ledger answer wins over a row.
 */
export async function findSeen(ops: Pick<Op, 'opId' | 'entity'>[], t: Transaction): Promise<Map<string, PushResult>> {
	const seen = new Map<string, PushResult>();
	if (!ops.length) return seen;
	const byTable = new Map<string, string[]>();
	for (const op of ops) {
		const table = APPEND_TABLES[op.entity as StoredAppendEntity];
		if (!table) continue;
		const list = byTable.get(table);
		if (list) list.push(op.opId);
		else byTable.set(table, [op.opId]);
	}
	const parts = ['SELECT s.op_id, s.result FROM sync_ops s WHERE s.op_id IN (?)'];
	const values: unknown[] = [ops.map((o) => o.opId)];
	for (const [table, ids] of byTable) {
		parts.push(`SELECT x.op_id, NULL FROM ${table} x WHERE x.op_id IN (?)`);
		values.push(ids);
	}
	const rows = await rawQuery<{ op_id: string; result: string | null }[]>(t, parts.join(' UNION ALL '), values);
	for (const r of rows) if (r.result !== null) seen.set(r.op_id, JSON.parse(r.result));
	for (const r of rows) {
		if (r.result === null && !seen.has(r.op_id)) seen.set(r.op_id, { opId: r.op_id, status: 'applied', version: 1 });
	}
	return seen;
}

/** Store first answers (never `server_error`, so that a retry may still apply). */
export async function remember(
	actor: Actor,
	deviceId: string,
	entries: { op: Op; result: PushResult }[],
	t: Transaction
): Promise<void> {
	const keep = entries.filter((e) => e.result.reason !== 'server_error');
	if (!keep.length) return;
	const values = keep.map(() => '(?, ?, ?, ?, ?, ?, ?, UTC_TIMESTAMP(3))').join(', ');
	await rawQuery(
		t,
		`INSERT IGNORE INTO sync_ops (op_id, workshop_id, user_id, device_id, entity, entity_id, result, at) VALUES ${values}`,
		keep.flatMap(({ op, result }) => [
			op.opId,
			actor.workshopId,
			actor.userId,
			deviceId,
			op.entity,
			op.entityId,
			JSON.stringify(result)
		])
	);
}
