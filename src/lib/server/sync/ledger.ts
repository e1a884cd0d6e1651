/**
 * The sync operation ledger: the first answer per opId. Mutable ops, every rejection and an
 * append-only create that found its very record already stored under another op id are
 * kept in `sync_ops`; an applied append-only record keeps its opId on its own row (one row
 * per reading), and its first answer is rebuilt from that row (`findStored`).
 *
 * These run on the transaction's driver connection (the sync hot path).
 */
import type { Transaction } from 'sequelize';
import { rawQuery } from '../db/raw';
import type { Actor } from '../auth/types';
import type { Op, PushResult } from '../../sync/protocol';
import { APPEND_TABLES, groupByTable, type StoredAppendEntity } from '../db/append-tables';

/**
 * First answers stored in the ledger for these opIds, by opId. With a `probe` (an
 * append-only create), its own table is asked too, and `probeStored` says whether its record
 * is there: the sign of a batch sent again, whose other records are likely stored as well.
 */
export async function findSeen(
	opIds: string[],
	t: Transaction,
	probe?: Pick<Op, 'opId' | 'entity'>
): Promise<{ seen: Map<string, PushResult>; probeStored: boolean }> {
	const seen = new Map<string, PushResult>();
	const table = probe && APPEND_TABLES[probe.entity as StoredAppendEntity];
	if (!opIds.length) return { seen, probeStored: false };
	const rows = await rawQuery<{ op_id: string; result: string | null }[]>(
		t,
		'SELECT op_id, result FROM sync_ops WHERE op_id IN (?)' +
			(table ? ` UNION ALL SELECT op_id, NULL FROM ${table} WHERE op_id = ?` : ''),
		table ? [opIds, probe!.opId] : [opIds]
	);
	let probeStored = false;
	for (const r of rows) {
		if (r.result !== null) seen.set(r.op_id, JSON.parse(r.result));
		else probeStored = true;
	}
	if (probeStored && !seen.has(probe!.opId)) seen.set(probe!.opId, { opId: probe!.opId, status: 'applied', version: 1 });
	return { seen, probeStored };
}

/**
 * The append-only ops whose record is already stored (an applied append-only op keeps its
 * opId on its row, in the table of its own entity); their first answer was `applied`.
 */
export async function findStored(ops: Pick<Op, 'opId' | 'entity'>[], t: Transaction): Promise<Map<string, PushResult>> {
	const stored = new Map<string, PushResult>();
	const byTable = groupByTable(ops, (op) => APPEND_TABLES[op.entity as StoredAppendEntity], (op) => op.opId);
	if (!byTable.size) return stored;
	const rows = await rawQuery<{ op_id: string }[]>(
		t,
		[...byTable.keys()].map((table) => `SELECT op_id FROM ${table} WHERE op_id IN (?)`).join(' UNION ALL '),
		[...byTable.values()]
	);
	for (const r of rows) stored.set(r.op_id, { opId: r.op_id, status: 'applied', version: 1 });
	return stored;
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
