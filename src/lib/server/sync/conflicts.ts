/**
 * The lead's conflicts: list the open ones, settle one by picking a side (the record's
 * value or a candidate's) or giving a value, with a note. The JSON API and the inbox's form
 * action both settle through `settle`. In one transaction:
 *  1. lock the open conflict (404 for another workshop's, 400 when already settled);
 *  2. write the chosen value as a new version through the aggregate's service (audited, in
 *     the change feed); when the record already holds it, send the record to the phones
 *     again at its version, so a phone still showing its own value takes the stored one;
 *  3. forget the field's writers: a phone that sends an older edit of the field after this
 *     clashes with the lead's choice instead of overwriting it as "its own" value;
 *  4. close the conflict with the settler, the value and the note (before step 2, so that the
 *     record's rules do not count this clash as open), and write the audit row (`conflict`,
 *     `settle`: who, when, the value kept and the note).
 */
import { QueryTypes, type Transaction } from 'sequelize';
import { z } from 'zod';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { appendChange, writeAudit } from '../db/feed';
import { NotFoundError, ValidationError } from '../errors';
import { DELETED_FIELD, type Writer } from '../../sync/merge';
import { AGGREGATES, type MutableEntity } from './registry';
import { toConflict } from './conflict-store';

const note = z.string().trim().max(500, 'At most 500 characters').optional();
export const settleInput = z.union([
	z.object({ pick: z.literal('server'), note }),
	z.object({ pick: z.literal('candidate'), deviceId: z.string().min(1).max(64), note }),
	z.object({ pick: z.literal('value'), value: z.unknown(), note })
]);
export type SettleInput = z.input<typeof settleInput>;

type Row = Parameters<typeof toConflict>[0] & { workshop_id: string; created_at: Date };

export async function listOpen(actor: Actor) {
	const rows = await db().query<Row>(
		"SELECT * FROM conflicts WHERE workshop_id = ? AND status = 'open' ORDER BY created_at",
		{ replacements: [actor.workshopId], type: QueryTypes.SELECT }
	);
	return rows.map((r) => ({ ...toConflict(r), createdAt: r.created_at }));
}

/** Which of `ids` are open clashes of the actor's workshop. */
export async function stillOpen(actor: Actor, ids: string[]): Promise<string[]> {
	if (!ids.length) return [];
	const rows = await db().query<{ id: string }>(
		"SELECT id FROM conflicts WHERE workshop_id = ? AND status = 'open' AND id IN (?)",
		{ replacements: [actor.workshopId, ids], type: QueryTypes.SELECT }
	);
	return rows.map((r) => r.id);
}

/** How many clashes wait for the lead (for the navigation's count). */
export async function countOpen(actor: Actor): Promise<number> {
	const [row] = await db().query<{ n: number | bigint }>(
		"SELECT COUNT(*) AS n FROM conflicts WHERE workshop_id = ? AND status = 'open'",
		{ replacements: [actor.workshopId], type: QueryTypes.SELECT }
	);
	return Number(row?.n ?? 0);
}

/** The record again in the change feed at its current version (nothing about it changes). */
async function resend(actor: Actor, entity: MutableEntity, id: string, t: Transaction) {
	const { def } = AGGREGATES[entity];
	const row = await def.model.findOne({
		where: { id, workshopId: actor.workshopId },
		transaction: t
	});
	if (!row) return;
	const r = row as never as { id: string; version: number; deletedAt: Date | null };
	await appendChange(t, actor.workshopId, {
		entity,
		entityId: r.id,
		version: r.version,
		op: r.deletedAt ? 'delete' : 'upsert',
		jobId: def.jobIdOf?.(row as never) ?? null,
		record: def.toRecord(row as never)
	});
}

/** Nobody stands behind the field's value as "their own" any more (see step 3). */
async function forgetWriters(entity: string, id: string, field: string, t: Transaction) {
	const [row] = await db().query<{ field_writers: string }>(
		'SELECT field_writers FROM record_meta WHERE entity = ? AND entity_id = ? FOR UPDATE',
		{ replacements: [entity, id], type: QueryTypes.SELECT, transaction: t }
	);
	if (!row) return;
	const writers = JSON.parse(row.field_writers) as Record<string, Writer[]>;
	if (!(field in writers)) return;
	writers[field] = [];
	await db().query('UPDATE record_meta SET field_writers = ? WHERE entity = ? AND entity_id = ?', {
		replacements: [JSON.stringify(writers), entity, id],
		type: QueryTypes.UPDATE,
		transaction: t
	});
}

export async function settle(actor: Actor, id: string, input: unknown) {
	const choice = settleInput.safeParse(input);
	if (!choice.success) throw ValidationError.fromZod(choice.error);
	return db().transaction(async (t) => {
		const [row] = await db().query<Row>(
			'SELECT * FROM conflicts WHERE id = ? AND workshop_id = ? FOR UPDATE',
			{
				replacements: [id, actor.workshopId],
				type: QueryTypes.SELECT,
				transaction: t
			}
		);
		if (!row) throw new NotFoundError('Conflict');
		const c = toConflict(row);
		if (row.status !== 'open')
			throw new ValidationError({ _: 'Already settled' }, 'Someone settled this clash already');
		const pick = choice.data;
		if (pick.pick === 'candidate' && !c.candidates.some((k) => k.deviceId === pick.deviceId)) {
			throw new ValidationError({ deviceId: 'No such candidate' });
		}
		const value =
			pick.pick === 'server'
				? c.server.value
				: pick.pick === 'value'
					? pick.value
					: c.candidates.find((k) => k.deviceId === pick.deviceId)?.value;
		// Settled first: the record's own rules ("Closed" needs no open clash on the job) must
		// not count the clash being settled. A refusal below rolls all of it back.
		const noteText = pick.note || null;
		await db().query(
			`UPDATE conflicts SET status = 'settled', settled_by = ?, settled_at = UTC_TIMESTAMP(3), settled_value = ?,
			   settled_note = ?, updated_at = UTC_TIMESTAMP(3) WHERE id = ?`,
			{
				replacements: [actor.userId, JSON.stringify(value ?? null), noteText, id],
				type: QueryTypes.UPDATE,
				transaction: t
			}
		);
		const entity = c.entity as MutableEntity;
		const agg = AGGREGATES[entity];
		const current = (await agg.read(actor, c.entityId, t).catch(() => null)) as {
			version: number;
		} | null;
		let record: Record<string, unknown> | null = current;
		if (current && c.field === DELETED_FIELD && value === true) {
			record = await agg.remove(actor, c.entityId, current.version, { transaction: t });
		} else if (current && c.field !== DELETED_FIELD && pick.pick !== 'server') {
			record = await agg.update(
				actor,
				c.entityId,
				current.version,
				{ [c.field]: value },
				{ transaction: t }
			);
		}
		if (record && record.version === current?.version) await resend(actor, entity, c.entityId, t);
		if (c.field !== DELETED_FIELD) await forgetWriters(entity, c.entityId, c.field, t);
		await writeAudit(
			t,
			actor,
			'conflict',
			id,
			'settle',
			[
				{
					field: c.field,
					old: c.server.value ?? null,
					new: {
						entity,
						entityId: c.entityId,
						pick: pick.pick,
						value: value ?? null,
						note: noteText
					}
				}
			],
			null
		);
		return { conflict: { ...c, status: 'settled' as const, note: noteText }, record };
	});
}
