/**
 * One mutable op (create, patch or delete), inside the batch's savepoint:
 *  1. parse the fields with the aggregate's schema (create: all, patch: those sent);
 *  2. lock the row; another workshop's record is `not_found` (and audited);
 *  3. the aggregate's rules (`check`: the rulebook every channel runs) on the fields the op
 *     changes — a refusal is `forbidden` with its words, a record the actor may not see is
 *     `not_found`, a field naming what does not exist is `invalid`; then, for a create, the
 *     server's own fields (`prepareCreate`: a job's number, a test's technician);
 *  4. run the pure merge rule (`mergeOp`) against the row, its per-field versions and
 *     writers, and its open conflicts;
 *  5. store the outcome through the one write path (`persistMerged`), then the writers and
 *     the conflicts.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { writeAudit } from '../db/feed';
import { AppError, ForbiddenError, ValidationError } from '../errors';
import { changedFields, parsePatch, persistMerged } from '../services/write-path';
import { mergeOp, type Conflict, type RecordState, type Writer } from '../../sync/merge';
import type { Op, PushResult, Reason } from '../../sync/protocol';
import { AGGREGATES, type MutableEntity } from './registry';
import { loadOpenConflicts, saveConflicts } from './conflict-store';

const rejected = (op: Op, reason: Reason, message?: string): PushResult =>
	({ opId: op.opId, status: 'rejected', reason, ...(message ? { message } : {}) }) as PushResult;

function parseFields(entity: MutableEntity, op: Op): Record<string, unknown> {
	const { def, clientInput } = AGGREGATES[entity];
	if (op.kind === 'delete') return {};
	const input = clientInput(op.fields);
	if (op.kind === 'patch') return parsePatch(def.patchSchema, input);
	const r = def.createSchema.safeParse(input);
	if (!r.success) throw ValidationError.fromZod(r.error);
	return r.data as Record<string, unknown>;
}

async function loadWriters(entity: string, id: string, t: Transaction) {
	const [row] = await db().query<{ field_writers: string }>(
		'SELECT field_writers FROM record_meta WHERE entity = ? AND entity_id = ?',
		{ replacements: [entity, id], type: QueryTypes.SELECT, transaction: t }
	);
	return row ? (JSON.parse(row.field_writers) as Record<string, Writer[]>) : {};
}

async function saveWriters(actor: Actor, entity: string, id: string, w: Record<string, Writer[]>, t: Transaction) {
	await db().query(
		`INSERT INTO record_meta (entity, entity_id, workshop_id, field_writers) VALUES (?, ?, ?, ?)
		 ON DUPLICATE KEY UPDATE field_writers = VALUES(field_writers)`,
		{ replacements: [entity, id, actor.workshopId, JSON.stringify(w)], type: QueryTypes.INSERT, transaction: t }
	);
}

/** Apply one mutable op; throws only on unexpected errors (the caller rolls back the savepoint). */
export async function applyMutableOp(actor: Actor, op: Op, t: Transaction): Promise<PushResult> {
	const entity = op.entity as MutableEntity;
	const agg = AGGREGATES[entity];
	let fields: Record<string, unknown>;
	try {
		fields = parseFields(entity, op);
	} catch (e) {
		if (e instanceof ValidationError) return rejected(op, 'invalid', Object.entries(e.fields).map(([k, v]) => `${k}: ${v}`).join('; '));
		throw e;
	}
	const Model = agg.def.model;
	const row = (await Model.findOne({ where: { id: op.entityId }, transaction: t, lock: t.LOCK.UPDATE })) as
		| (InstanceType<typeof Model> & Record<string, unknown>)
		| null;
	if (row && row.get('workshopId') !== actor.workshopId) {
		await writeAudit(t, { ...actor }, entity, op.entityId, 'refused_foreign', [], op.opId);
		return rejected(op, 'not_found');
	}
	const plain = row ? (row.get({ plain: true }) as Record<string, unknown>) : null;
	try {
		if (op.kind === 'create') {
			// A create of a stored record is answered by the merge (the same fields: applied).
			if (!row) {
				await agg.check(actor, 'create', null, fields, t);
				if (agg.def.prepareCreate) fields = await agg.def.prepareCreate(actor, fields, t);
			}
		} else if (row && !row.get('deletedAt')) {
			const kind = op.kind === 'delete' ? 'delete' : 'update';
			await agg.check(actor, kind, row as never, kind === 'delete' ? {} : changedFields(row, fields), t);
		}
	} catch (e) {
		if (e instanceof ForbiddenError) return rejected(op, 'forbidden', e.message);
		if (e instanceof ValidationError) return rejected(op, 'invalid', Object.values(e.fields).join('; '));
		if (e instanceof AppError && e.status === 404) return rejected(op, 'not_found');
		throw e;
	}
	const writers = row ? await loadWriters(entity, op.entityId, t) : {};
	const state: RecordState | null = plain && {
		version: plain.version as number,
		deleted: plain.deletedAt != null,
		fields: Object.fromEntries(Object.keys(fields).map((k) => [k, row!.get(k)])),
		fieldVersions: JSON.parse(plain.fieldVersions as string),
		fieldWriters: writers
	};
	const open: Conflict[] = row ? await loadOpenConflicts(op.entityId, t) : [];
	const outcome = mergeOp(state, { ...op, fields, deviceId: actor.deviceId!, userId: actor.userId }, {
		openConflicts: open,
		newConflictId: () => uuidv7()
	});
	if (outcome.result.status === 'rejected' || !outcome.state) return outcome.result;
	const s = outcome.state;
	const changedValues = Object.fromEntries(outcome.changed.map((c) => [c.field, c.new]));
	await persistMerged(
		agg as never,
		actor,
		{
			id: op.entityId,
			row: row as never,
			version: s.version,
			deleted: s.deleted,
			fieldVersions: s.fieldVersions,
			fields: row ? changedValues : s.fields,
			changed: outcome.changed,
			feed: outcome.feed
		},
		op.opId,
		t
	);
	await saveWriters(actor, entity, op.entityId, s.fieldWriters, t);
	if (outcome.conflicts.length) await saveConflicts(actor, outcome.conflicts, t);
	return outcome.result;
}
