/**
 * The one write path (DESIGN §3). Every aggregate's service is built with `defineAggregate`,
 * and every write — form action, JSON route or sync op — goes through it. In ONE transaction:
 *  1. validate the input with the aggregate's zod schema (400 naming the field); fields the
 *     server owns are never taken from the input (`serverOwned`, and the schemas leave them
 *     out): only the server's own callers set them, through `serverFields`;
 *  2. read the row FOR UPDATE, scoped to the actor's workshop (404 otherwise);
 *  3. the aggregate's rules (`authorize`: who may, 403 or 404; `checkFields`: what the
 *     fields refer to, 400) — the one rulebook, `rules.ts`, which the sync path calls too;
 *  4. check the version the caller saw (409 with the current record when stale);
 *  5. write the row with `version + 1` and the per-field versions;
 *  6. write one audit row per changed field;
 *  7. append the change row with the next per-workshop `seq`.
 * A failure anywhere rolls back all of it.
 *
 * The one sanctioned exception is the append-only path of sync (`server/sync/append.ts`:
 * readings, spark and swap tests, sign-offs), which writes hundreds of rows per push in bulk;
 * it calls the rulebook's `refuseAppend` for every record instead.
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
	/** What the calling service vouches for, for the rules (e.g. the job a customer is added for). */
	via?: RuleContext['via'];
};

/** The three kinds of write every channel offers. */
export type WriteKind = 'create' | 'update' | 'delete';

/** What an aggregate's rules see of one write. */
export type RuleContext = {
	actor: Actor;
	kind: WriteKind;
	/** The stored row as plain values (null for a create). */
	row: Record<string, unknown> | null;
	/** create: every field; update: the fields whose value changes; delete: none. */
	changed: Record<string, unknown>;
	/** The stored record as the API sends it (for an answer that carries it). */
	current: () => Record<string, unknown>;
	t: Transaction;
	via?: { jobId?: string | null };
};

/** An aggregate's rules: each throws to refuse, and every channel runs them. */
export type Rules = {
	/** Who may make this write: 403 (ForbiddenError) or 404 when the record is not theirs to see. */
	authorize?: (c: RuleContext) => void | Promise<void>;
	/** What the fields name must exist and fit (a customer of the workshop, an approved sheet): 400. */
	checkFields?: (c: RuleContext) => void | Promise<void>;
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
	/** Runs after each stored write, in its transaction, with the changed fields. */
	afterWrite?: (
		actor: Actor,
		row: Row,
		action: string,
		changed: AuditRow[],
		t: Transaction
	) => Promise<void>;
	/** The job a record belongs to, for pull scoping (null: workshop-wide). */
	jobIdOf?: (row: Row) => string | null;
	/** The aggregate's rules (`rules.ts`). */
	rules?: Rules;
	/** Fields only the server sets (job number, technician, approval…): dropped from any input. */
	serverOwned?: readonly string[];
};

/**
 * Steps 5 and 6 of every write, and the aggregate's own follow-up: one audit row per
 * changed field, the change-feed row, then `afterWrite` — all in the write's transaction.
 */
async function recordWrite(
	def: AggregateDef<z.ZodType, z.ZodType>,
	actor: Actor,
	row: Row,
	action: string,
	rows: AuditRow[],
	opId: string | null,
	t: Transaction
) {
	await writeAudit(t, actor, def.entity, row.id, action, rows, opId);
	await appendChange(t, actor.workshopId, {
		entity: def.entity,
		entityId: row.id,
		version: row.version,
		op: row.deletedAt ? 'delete' : 'upsert',
		jobId: def.jobIdOf?.(row) ?? null,
		record: def.toRecord(row)
	});
	await def.afterWrite?.(actor, row, action, rows, t);
}

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

/**
 * Parse a patch and keep only the fields the caller sent: zod's `.partial()` still fills
 * `.default()`s, which would silently overwrite fields the caller never touched.
 */
export function parsePatch<S extends z.ZodType>(
	schema: S,
	input: unknown
): Record<string, unknown> {
	const out = parse(schema, input) as Record<string, unknown>;
	const sent = input && typeof input === 'object' ? Object.keys(input) : [];
	return Object.fromEntries(Object.entries(out).filter(([k]) => sent.includes(k)));
}

const json = (v: unknown) => (v === undefined ? null : JSON.stringify(v));
const same = (a: unknown, b: unknown) => json(a) === json(b);

/** The fields whose value differs from the stored row's: what a write really changes. */
export function changedFields(row: { get: (k: string) => unknown }, fields: Record<string, unknown>) {
	return Object.fromEntries(Object.entries(fields).filter(([k, v]) => !same(row.get(k), v)));
}

/** The input without the fields the server owns (they never come from a client). */
function clientInput(input: unknown, owned: readonly string[] | undefined): unknown {
	if (!owned?.length || !input || typeof input !== 'object' || Array.isArray(input)) return input;
	const out = { ...(input as Record<string, unknown>) };
	for (const k of owned) delete out[k];
	return out;
}

/** The stored row as plain values, for the rules. */
const plainOf = (row: Row) => row.get({ plain: true }) as Record<string, unknown>;

export function defineAggregate<C extends z.ZodType, P extends z.ZodType>(def: AggregateDef<C, P>) {
	const Model = def.model as unknown as ModelStatic<Row>;

	/** The aggregate's rules for one write: authorize (403/404), then the fields (400). */
	async function check(c: RuleContext) {
		await def.rules?.authorize?.(c);
		await def.rules?.checkFields?.(c);
	}
	const ctx = (
		actor: Actor,
		kind: WriteKind,
		row: Row | null,
		changed: Record<string, unknown>,
		t: Transaction,
		via?: RuleContext['via']
	): RuleContext => ({
		actor,
		kind,
		row: row && plainOf(row),
		changed,
		current: () => (row ? def.toRecord(row) : {}),
		t,
		via
	});

	async function lockRow(actor: Actor, id: string, t: Transaction): Promise<Row> {
		const row = await Model.findOne({
			where: { id, workshopId: actor.workshopId },
			transaction: t,
			lock: t.LOCK.UPDATE
		});
		if (!row) throw new NotFoundError();
		return row;
	}

	const record = (actor: Actor, row: Row, action: string, rows: AuditRow[], t: Transaction, o: WriteOptions) =>
		recordWrite(def, actor, row, action, rows, o.opId ?? null, t);

	return {
		entity: def.entity,
		toRecord: def.toRecord,
		/** The definition, for the sync service (which merges ops on the same rows). */
		def,
		/** Drop the fields the server owns from a client's input. */
		clientInput: (input: unknown) => clientInput(input, def.serverOwned),
		/**
		 * The rules for a write decided elsewhere (the sync merge): `row` is the stored row or
		 * null, `changed` the fields the write sets. Throws as `create`/`update`/`remove` would.
		 */
		check: (
			actor: Actor,
			kind: WriteKind,
			row: Row | null,
			changed: Record<string, unknown>,
			t: Transaction
		) => check(ctx(actor, kind, row, changed, t)),

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
			const fields = {
				...(parse(def.createSchema, clientInput(input, def.serverOwned)) as Record<string, unknown>),
				...o.serverFields
			};
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
				await check(ctx(actor, 'create', null, fields, t, o.via));
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
			const parsed = def.patchSchema.safeParse(clientInput(input, def.serverOwned));
			return inTransaction(o.transaction, async (t) => {
				const row = await lockRow(actor, id, t);
				if (row.deletedAt) throw new NotFoundError();
				if (!parsed.success) {
					// Not theirs to change at all comes first (403), then what is wrong in it (400).
					await def.rules?.authorize?.(ctx(actor, 'update', row, {}, t, o.via));
					throw ValidationError.fromZod(parsed.error);
				}
				const fields = { ...(parsed.data as Record<string, unknown>), ...o.serverFields };
				const changed = Object.entries(changedFields(row, fields));
				await check(ctx(actor, 'update', row, Object.fromEntries(changed), t, o.via));
				if (row.version !== baseVersion) throw new StaleVersionError(def.toRecord(row));
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
				await check(ctx(actor, 'delete', row, {}, t, o.via));
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

/** A merged sync op to store (see `src/lib/server/sync/mutable.ts`). */
export type MergedWrite = {
	id: string;
	row: Row | null;
	version: number;
	deleted: boolean;
	fieldVersions: Record<string, number>;
	/** For a create: every field; for a patch: the changed fields only. */
	fields: Record<string, unknown>;
	changed: { field: string; old: unknown; new: unknown }[];
	feed: 'upsert' | 'delete' | null;
};

/**
 * Store the outcome of the sync merge for an aggregate — the same row, audit and change
 * writes as `create`/`update`/`remove`, with the version and per-field versions the merge
 * decided. Runs inside the caller's transaction (the batch's savepoint).
 */
export async function persistMerged(
	agg: { def: AggregateDef<z.ZodType, z.ZodType> },
	actor: Actor,
	w: MergedWrite,
	opId: string,
	t: Transaction
): Promise<Record<string, unknown>> {
	const Model = agg.def.model as unknown as ModelStatic<Row>;
	const common = {
		version: w.version,
		fieldVersions: JSON.stringify(w.fieldVersions),
		updatedBy: actor.userId,
		deviceId: actor.deviceId ?? null,
		deviceTime: actor.deviceTime ?? null
	};
	let row = w.row;
	if (!row) {
		row = await Model.create(
			{
				...w.fields,
				...common,
				id: w.id,
				workshopId: actor.workshopId,
				deletedAt: null,
				createdBy: actor.userId
			} as never,
			{ transaction: t }
		);
	} else if (w.feed) {
		row.set({ ...w.fields, ...common, ...(w.deleted ? { deletedAt: new Date() } : {}) } as never);
		await row.save({ transaction: t });
	}
	if (w.feed) {
		const action = !w.row ? 'create' : w.deleted ? 'delete' : 'update';
		await recordWrite(agg.def, actor, row, action, w.changed, opId, t);
	}
	return agg.def.toRecord(row);
}
