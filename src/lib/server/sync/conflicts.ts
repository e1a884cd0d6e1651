/**
 * The lead's conflicts: list the open ones, settle one by picking a side (the record's
 * value or a candidate's) or giving a value. Settling applies as a new version through the
 * aggregate's service (audited, in the feed) and closes the conflict.
 */
import { QueryTypes } from 'sequelize';
import { z } from 'zod';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { NotFoundError, ValidationError } from '../errors';
import { DELETED_FIELD } from '../../sync/merge';
import { AGGREGATES, type MutableEntity } from './registry';
import { toConflict } from './conflict-store';

export const settleInput = z.union([
	z.object({ pick: z.literal('server') }),
	z.object({ pick: z.literal('candidate'), deviceId: z.string().min(1).max(64) }),
	z.object({ pick: z.literal('value'), value: z.unknown() })
]);

type Row = Parameters<typeof toConflict>[0] & { workshop_id: string; created_at: Date };

export async function listOpen(actor: Actor) {
	const rows = await db().query<Row>(
		"SELECT * FROM conflicts WHERE workshop_id = ? AND status = 'open' ORDER BY created_at",
		{ replacements: [actor.workshopId], type: QueryTypes.SELECT }
	);
	return rows.map((r) => ({ ...toConflict(r), createdAt: r.created_at }));
}

export async function settle(actor: Actor, id: string, input: unknown) {
	const choice = settleInput.safeParse(input);
	if (!choice.success) throw ValidationError.fromZod(choice.error);
	return db().transaction(async (t) => {
		const [row] = await db().query<Row>('SELECT * FROM conflicts WHERE id = ? AND workshop_id = ? FOR UPDATE', {
			replacements: [id, actor.workshopId],
			type: QueryTypes.SELECT,
			transaction: t
		});
		if (!row) throw new NotFoundError('Conflict');
		const c = toConflict(row);
		if (row.status !== 'open') throw new ValidationError({ _: 'Already settled' });
		const pick = choice.data;
		const value =
			pick.pick === 'server'
				? c.server.value
				: pick.pick === 'value'
					? pick.value
					: c.candidates.find((k) => k.deviceId === pick.deviceId)?.value;
		if (pick.pick === 'candidate' && !c.candidates.some((k) => k.deviceId === pick.deviceId)) {
			throw new ValidationError({ deviceId: 'No such candidate' });
		}
		const agg = AGGREGATES[c.entity as MutableEntity];
		const current = (await agg.read(actor, c.entityId, t).catch(() => null)) as { version: number } | null;
		let record: Record<string, unknown> | null = current;
		if (current && c.field === DELETED_FIELD && value === true) {
			record = await agg.remove(actor, c.entityId, current.version, { transaction: t });
		} else if (current && c.field !== DELETED_FIELD && pick.pick !== 'server') {
			record = await agg.update(actor, c.entityId, current.version, { [c.field]: value }, { transaction: t });
		}
		await db().query(
			"UPDATE conflicts SET status = 'settled', settled_by = ?, settled_at = UTC_TIMESTAMP(3), settled_value = ?, updated_at = UTC_TIMESTAMP(3) WHERE id = ?",
			{ replacements: [actor.userId, JSON.stringify(value ?? null), id], type: QueryTypes.UPDATE, transaction: t }
		);
		return { conflict: { ...c, status: 'settled' as const }, record };
	});
}
