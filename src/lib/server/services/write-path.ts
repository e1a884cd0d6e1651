/**
 * The one write path (DESIGN §3). Every aggregate's service is built with `defineAggregate`,
 * and every write — form action, JSON route or sync op — goes through it. In ONE transaction:
 *  1. validate the input with the aggregate's zod schema (400 naming the field);
 *  2. read the row FOR UPDATE, scoped to the actor's workshop (404 otherwise);
 *  3. check the version the caller saw (409 with the current record when stale);
 *  4. write the row with `version + 1` and the per-field versions;
 *  5. write one audit row per changed field;
 *  6. append the change row with the next per-workshop `seq`.
 * A failure anywhere rolls back all of it.
 */
import { Op, type Model, type ModelStatic, type Transaction } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import type { z } from 'zod';
import { db } from '../db';
import { appendChange, writeAudit, type AuditRow } from '../db/feed';
import { IdConflictError, NotFoundError, StaleVersionError, ValidationError } from '../errors';
import type { Actor } from '../auth/types';

export type WriteOptions = {
	transaction?: Transaction;
	opId?: string | null;
	/** Fields set by the server itself (e.g. approval), applied after the input is validated. */
	serverFields?: Record<string, unknown>;
};
type Row = Model & {
	id: string;
	workshopId: string;
	version: number;
	fieldVersions: string;
	deletedAt: Date | null;
	[k: string]: unknown;
};

export type AggregateDef<C extends z.ZodType, P extends z.ZodType> = {
	entity: string;
	model: ModelStatic<Model>;
	createSchema: C;
	patchSchema: P;
	/** The public record sent in the change feed and the API (plain JSON). */
	toRecord: (row: Row) => Record<string, unknown>;
	/** Fill server-side fields (e.g. a job number) before a create, inside the transaction. */
	prepareCreate?: (
		actor: Actor,
		fields: Record<string, unknown>,
		t: Transaction
	) => Promise<Record<string, unknown>>;
	/** The job a record belongs to, for pull scoping (null: workshop-wide). */
	jobIdOf?: (row: Row) => string | null;
};

/** Run `fn` in the given transaction, or in a new one. */
export async function inTransaction<T>(
	t: Transaction | undefined,
	fn: (t: Transaction) => Promise<T>
): Promise<T> {
	return t ? fn(t) : db().transaction(fn);
}

function parse<S extends z.ZodType>(schema: S, input: unknown): z.output<S> {
	const r = schema.safeParse(input);
	if (!r.success) throw ValidationError.fromZod(r.error);
	return r.data;
}

const json = (v: unknown) => (v === undefined ? null : JSON.stringify(v));
const same = (a: unknown, b: unknown) =>
	a instanceof Date || b instanceof Date ? json(a) === json(b) : json(a) === json(b);

export function defineAggregate<C extends z.ZodType, P extends z.ZodType>(def: AggregateDef<C, P>) {
	const Model = def.model as unknown as ModelStatic<Row>;

	async function lockRow(actor: Actor, id: string, t: Transaction): Promise<Row> {
		const row = await Model.findOne({
			where: { id, workshopId: actor.workshopId },
			transaction: t,
			lock: t.LOCK.UPDATE
		});
		if (!row) throw new NotFoundError();
		return row;
	}

	async function record(
		actor: Actor,
		row: Row,
		action: string,
		rows: AuditRow[],
		t: Transaction,
		o: WriteOptions
	) {
		await writeAudit(t, actor, def.entity, row.id, action, rows, o.opId ?? null);
		await appendChange(t, actor.workshopId, {
			entity: def.entity,
			entityId: row.id,
			version: row.version,
			op: row.deletedAt ? 'delete' : 'upsert',
			jobId: def.jobIdOf?.(row) ?? null,
			record: def.toRecord(row)
		});
	}

	return {
		entity: def.entity,
		toRecord: def.toRecord,
		/** The definition, for the sync service (which merges ops on the same rows). */
		def,

		/** Read one live record of the actor's workshop (404 otherwise). */
		async read(actor: Actor, id: string, t?: Transaction) {
			const row = await Model.findOne({
				where: { id, workshopId: actor.workshopId, deletedAt: { [Op.is]: null } },
				transaction: t
			});
			if (!row) throw new NotFoundError();
			return def.toRecord(row);
		},

		/** Create (version 1). An existing id with the same fields is returned as is. */
		async create(actor: Actor, input: unknown, o: WriteOptions & { id?: string } = {}) {
			const fields = parse(def.createSchema, input) as Record<string, unknown>;
			return inTransaction(o.transaction, async (t) => {
				const id = o.id ?? uuidv7();
				const existing = await Model.findOne({ where: { id }, transaction: t });
				if (existing) {
					const sameFields =
						existing.workshopId === actor.workshopId &&
						Object.entries(fields).every(([k, v]) => same(existing.get(k), v));
					if (!sameFields) throw new IdConflictError();
					return def.toRecord(existing);
				}
				if (def.prepareCreate) Object.assign(fields, await def.prepareCreate(actor, fields, t));
				const fv = Object.fromEntries(Object.keys(fields).map((k) => [k, 1]));
				const row = await Model.create(
					{
						...fields,
						id,
						workshopId: actor.workshopId,
						version: 1,
						fieldVersions: JSON.stringify(fv),
						deletedAt: null,
						createdBy: actor.userId,
						updatedBy: actor.userId,
						deviceId: actor.deviceId ?? null,
						deviceTime: actor.deviceTime ?? null
					} as never,
					{ transaction: t }
				);
				const audit = Object.entries(fields).map(([field, v]) => ({ field, old: null, new: v }));
				await record(actor, row, 'create', audit, t, o);
				return def.toRecord(row);
			});
		},

		/** Change fields the caller saw at `baseVersion`; 409 when the record moved on. */
		async update(
			actor: Actor,
			id: string,
			baseVersion: number,
			input: unknown,
			o: WriteOptions = {}
		) {
			const fields = {
				...(parse(def.patchSchema, input) as Record<string, unknown>),
				...o.serverFields
			};
			return inTransaction(o.transaction, async (t) => {
				const row = await lockRow(actor, id, t);
				if (row.deletedAt) throw new NotFoundError();
				if (row.version !== baseVersion) throw new StaleVersionError(def.toRecord(row));
				const changed = Object.entries(fields).filter(([k, v]) => !same(row.get(k), v));
				if (changed.length === 0) return def.toRecord(row);
				const version = row.version + 1;
				const fv = JSON.parse(row.fieldVersions) as Record<string, number>;
				const audit = changed.map(([field, v]) => ({ field, old: row.get(field), new: v }));
				for (const [k] of changed) fv[k] = version;
				row.set({
					...Object.fromEntries(changed),
					version,
					fieldVersions: JSON.stringify(fv),
					updatedBy: actor.userId,
					deviceId: actor.deviceId ?? null,
					deviceTime: actor.deviceTime ?? null
				} as never);
				await row.save({ transaction: t });
				await record(actor, row, 'update', audit, t, o);
				return def.toRecord(row);
			});
		},

		/** Delete as a tombstone (the row stays, with `deletedAt`). */
		async remove(actor: Actor, id: string, baseVersion: number, o: WriteOptions = {}) {
			return inTransaction(o.transaction, async (t) => {
				const row = await lockRow(actor, id, t);
				if (row.deletedAt) return def.toRecord(row);
				if (row.version !== baseVersion) throw new StaleVersionError(def.toRecord(row));
				row.set({
					version: row.version + 1,
					deletedAt: new Date(),
					updatedBy: actor.userId
				} as never);
				await row.save({ transaction: t });
				await record(actor, row, 'delete', [], t, o);
				return def.toRecord(row);
			});
		}
	};
}
