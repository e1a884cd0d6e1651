/** Conflicts kept for the lead: at most one open per record and field (a unique key). */
import { QueryTypes, type Transaction } from 'sequelize';
import type { Actor } from '../auth/types';
import { db } from '../db';
import type { Conflict } from '../../sync/merge';

type Row = {
	id: string;
	entity: string;
	entity_id: string;
	field: string;
	status: 'open' | 'agreed' | 'settled';
	server_value: string | null;
	server_writers: string;
	candidates: string;
};

const parse = (v: string | null) => (v == null ? null : JSON.parse(v));

export function toConflict(r: Row): Conflict {
	return {
		conflictId: r.id,
		entity: r.entity as Conflict['entity'],
		entityId: r.entity_id,
		field: r.field,
		status: r.status === 'settled' ? 'agreed' : r.status,
		server: { value: parse(r.server_value), writers: JSON.parse(r.server_writers) },
		candidates: JSON.parse(r.candidates)
	};
}

export async function loadOpenConflicts(entityId: string, t: Transaction): Promise<Conflict[]> {
	const rows = await db().query<Row>("SELECT * FROM conflicts WHERE entity_id = ? AND status = 'open' FOR UPDATE", {
		replacements: [entityId],
		type: QueryTypes.SELECT,
		transaction: t
	});
	return rows.map(toConflict);
}

/** Insert or update each conflict by id, in its full new form. */
export async function saveConflicts(actor: Actor, list: Conflict[], t: Transaction): Promise<void> {
	for (const c of list) {
		await db().query(
			`INSERT INTO conflicts (id, workshop_id, entity, entity_id, field, status, server_value, server_writers, candidates, created_at, updated_at)
			 VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, UTC_TIMESTAMP(3), UTC_TIMESTAMP(3))
			 ON DUPLICATE KEY UPDATE status = VALUES(status), server_value = VALUES(server_value),
			   server_writers = VALUES(server_writers), candidates = VALUES(candidates), updated_at = UTC_TIMESTAMP(3)`,
			{
				replacements: [
					c.conflictId,
					actor.workshopId,
					c.entity,
					c.entityId,
					c.field,
					c.status,
					JSON.stringify(c.server.value ?? null),
					JSON.stringify(c.server.writers),
					JSON.stringify(c.candidates)
				],
				type: QueryTypes.INSERT,
				transaction: t
			}
		);
	}
}
