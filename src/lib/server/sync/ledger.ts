/**
 * The sync operation ledger: the first answer per opId. Mutable ops and every rejection
 * are stored in `sync_ops`; an applied append-only record keeps its opId on its own row
 * (one row per reading), and its first answer is rebuilt from that row.
 *
 * Both run once per push, on the transaction's driver connection (the sync hot path).
 */
import type { Transaction } from 'sequelize';
import { rawQuery, WITH_IDS } from '../db/feed';
import type { Actor } from '../auth/types';
import type { Op, PushResult } from '../../sync/protocol';
import { APPEND_TABLES } from './append-tables';

/**
 * First answers for the opIds already seen, by opId: one query over the ledger and the
 * append-only tables; a ledger answer wins over a row.
 */
export async function findSeen(opIds: string[], t: Transaction): Promise<Map<string, PushResult>> {
	const seen = new Map<string, PushResult>();
	if (!opIds.length) return seen;
	const tables = Object.values(APPEND_TABLES);
	const rows = await rawQuery<{ op_id: string; result: string | null }[]>(
		t,
		WITH_IDS +
			[
				'SELECT s.op_id, s.result FROM ids JOIN sync_ops s ON s.op_id = ids.v',
				...tables.map((table) => `SELECT x.op_id, NULL FROM ids JOIN ${table} x ON x.op_id = ids.v`)
			].join(' UNION ALL '),
		[JSON.stringify(opIds)]
	);
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
