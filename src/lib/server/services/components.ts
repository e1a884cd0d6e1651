/**
 * Components and spec sheets on the one write path, and the component side of the spec
 * library: the searchable list, one component with its sheet versions, and the rules of
 * adding and changing a component (a part number once per workshop; only a lead or owner
 * removes a caution). Sheet rules are in `sheets.ts`, the CSV layout in `spec-csv.ts`.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import { z } from 'zod';
import type { ListPage } from '../../schemas/common';
import {
	componentCreate,
	componentPatch,
	libraryQuery,
	sheetCreate,
	sheetPatch,
	type ComponentRecord
} from '../../schemas/component';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { Component, SpecSheet, User } from '../db/models';
import { NotFoundError, ValidationError } from '../errors';
import { inOrder, likeOf, orderBy, pageOfIds, Where } from './list-sql';
import { componentRules, sheetRules } from './rules';
import { defineAggregate, inTransaction } from './write-path';

const COMPONENT_FIELDS = [
	'partNumber',
	'kind',
	'description',
	'fitment',
	'cautions',
	'positions'
] as const;
const SHEET_FIELDS = [
	'componentId',
	'sheetVersion',
	'state',
	'checks',
	'source',
	'approvedBy',
	'approvedAt'
] as const;

export const components = defineAggregate({
	entity: 'component',
	model: Component,
	createSchema: componentCreate,
	patchSchema: componentPatch,
	rules: componentRules,
	toRecord: (r) => ({
		id: r.id,
		version: r.version,
		...Object.fromEntries(COMPONENT_FIELDS.map((f) => [f, r.get(f)])),
		deleted: r.deletedAt != null
	})
});

/** 404 unless `componentId` is a live component of the actor's workshop. */
async function assertComponent(actor: Actor, componentId: unknown, t: Transaction) {
	const c = await Component.findOne({
		where: { id: String(componentId), workshopId: actor.workshopId, deletedAt: null },
		transaction: t
	});
	if (!c) throw new NotFoundError('Component');
}

type StoredRow = {
	id: string;
	version: number;
	deletedAt: Date | null;
	get: (k: string) => unknown;
};
const sheetRecord = (r: StoredRow) => ({
	id: r.id,
	version: r.version,
	...Object.fromEntries(SHEET_FIELDS.map((f) => [f, r.get(f)])),
	deleted: r.deletedAt != null
});

/** Fields of a sheet only the server sets: its version number, its state and the approval. */
const SHEET_SERVER_OWNED = ['sheetVersion', 'state', 'approvedBy', 'approvedAt'] as const;

/** A new sheet is a draft with the component's next version number (server-assigned). */
export const sheets = defineAggregate({
	entity: 'sheet',
	model: SpecSheet,
	createSchema: sheetCreate,
	patchSchema: sheetPatch,
	rules: sheetRules,
	serverOwned: SHEET_SERVER_OWNED,
	prepareCreate: async (actor, fields, t) => {
		await assertComponent(actor, fields.componentId, t);
		const [row] = await db().query<{ n: number | null }>(
			'SELECT MAX(sheet_version) AS n FROM spec_sheets WHERE component_id = ? AND workshop_id = ? FOR UPDATE',
			{
				replacements: [fields.componentId, actor.workshopId],
				transaction: t,
				type: QueryTypes.SELECT
			}
		);
		return { ...fields, sheetVersion: Number(row?.n ?? 0) + 1, state: 'draft' };
	},
	toRecord: sheetRecord
});

/**
 * Sheets written by the CSV import (leads and owners only): the file's version number and
 * state are kept, so export → import → export gives the same file. Same entity, table,
 * record, audit and change feed as `sheets`.
 */
export const importedSheets = defineAggregate({
	entity: 'sheet',
	model: SpecSheet,
	createSchema: sheetCreate.extend({
		sheetVersion: z.number().int().min(1),
		state: z.enum(['draft', 'approved']),
		approvedBy: z.uuid().nullable(),
		approvedAt: z.date().nullable()
	}),
	patchSchema: sheetPatch,
	rules: sheetRules,
	prepareCreate: async (actor, fields, t) => {
		await assertComponent(actor, fields.componentId, t);
		return fields;
	},
	toRecord: sheetRecord
});


function parseOr400<S extends z.ZodType>(schema: S, input: unknown): z.output<S> {
	const r = schema.safeParse(input);
	if (!r.success) throw ValidationError.fromZod(r.error);
	return r.data;
}

/** Add a component (anyone in the workshop; a part number once per workshop). */
export async function createComponent(
	actor: Actor,
	input: unknown,
	o: { transaction?: Transaction; id?: string } = {}
) {
	return components.create(actor, input, { transaction: o.transaction, id: o.id });
}

/**
 * Change a component seen at `baseVersion`: 404 across workshops, 403 when someone other
 * than a lead or owner removes a caution (`componentRules`), 400 for a part number in use,
 * 409 when stale.
 */
export async function updateComponent(
	actor: Actor,
	id: string,
	baseVersion: number,
	input: unknown,
	o: { transaction?: Transaction } = {}
) {
	return components.update(actor, id, baseVersion, input, { transaction: o.transaction });
}

export type SheetSummary = {
	id: string;
	version: number;
	sheetVersion: number;
	state: 'draft' | 'approved';
	checkCount: number;
	approvedAt: Date | null;
	approvedBy: { id: string; name: string } | null;
	createdBy: string | null;
	updatedAt: Date;
};

/** The live sheets of a component, newest version first, with the approver's name. */
export async function sheetSummaries(actor: Actor, componentId: string): Promise<SheetSummary[]> {
	const rows = await SpecSheet.findAll({
		where: { workshopId: actor.workshopId, componentId, deletedAt: null },
		order: [['sheetVersion', 'DESC']]
	});
	const ids = [...new Set(rows.map((r) => r.approvedBy).filter((x): x is string => !!x))];
	const users = ids.length ? await User.findAll({ where: { id: ids } }) : [];
	const names = new Map(users.map((u) => [u.id, u.name]));
	return rows.map((r) => ({
		id: r.id,
		version: r.version,
		sheetVersion: r.sheetVersion,
		state: r.state,
		checkCount: ((r.checks as unknown[] | null) ?? []).length,
		approvedAt: r.approvedAt,
		approvedBy: r.approvedBy ? { id: r.approvedBy, name: names.get(r.approvedBy) ?? '—' } : null,
		createdBy: r.get('createdBy') as string | null,
		updatedAt: r.get('updatedAt') as Date
	}));
}

/** One component of the workshop with its sheet versions (404 otherwise). */
export async function readComponent(actor: Actor, id: string) {
	const component = (await components.read(actor, id)) as ComponentRecord;
	return { component, sheets: await sheetSummaries(actor, id) };
}

/** A component in the library list, with its newest approved version and a newer draft. */
export type ComponentItem = ComponentRecord & {
	approvedVersion: number | null;
	draftVersion: number | null;
	updatedAt: Date;
};

const LATEST_APPROVED = `COALESCE((SELECT MAX(a.sheet_version) FROM spec_sheets a
	WHERE a.component_id = c.id AND a.deleted_at IS NULL AND a.state = 'approved'), 0)`;
const FITMENT_TABLE = `JSON_TABLE(c.fitment, '$[*]' COLUMNS (
	make VARCHAR(60) PATH '$.make', model VARCHAR(60) PATH '$.model',
	engine_code VARCHAR(30) PATH '$.engineCode',
	year_from INT PATH '$.yearFrom', year_to INT PATH '$.yearTo')) f`;

/** Add the search of `q` to `where`: every word must match the part number, the description or a vehicle. */
function whereSearch(where: Where, q: string) {
	for (const word of q.split(/\s+/).filter(Boolean).slice(0, 6)) {
		const like = likeOf(word);
		const year = /^\d{4}$/.test(word) ? Number(word) : null;
		const inYears = year
			? ` OR ((f.year_from IS NOT NULL OR f.year_to IS NOT NULL)
				AND COALESCE(f.year_from, 0) <= ? AND COALESCE(f.year_to, 9999) >= ?)`
			: '';
		where.and(
			`(c.part_number LIKE ? OR c.description LIKE ? OR EXISTS (SELECT 1 FROM ${FITMENT_TABLE}
				WHERE f.make LIKE ? OR f.model LIKE ? OR f.engine_code LIKE ?${inYears}))`,
			like,
			like,
			like,
			like,
			like,
			...(year ? [year, year] : [])
		);
	}
}

const SORT_COLUMNS = { partNumber: 'c.part_number', kind: 'c.kind', updatedAt: 'c.updated_at' };

/**
 * One page of the workshop's library: `q` searches part numbers, descriptions and fitment
 * (make, model, engine code, a four-digit year within the years fitted); `kind` filters the
 * kind; `sheets` keeps components with an approved sheet, a draft newer than the approved
 * one, or no sheet at all. 400 naming the parameter for a bad query.
 */
export async function listComponents(
	actor: Actor,
	input: unknown
): Promise<ListPage<ComponentItem>> {
	const query = parseOr400(libraryQuery, input);
	const where = new Where().and('c.workshop_id = ?', actor.workshopId).and('c.deleted_at IS NULL');
	if (query.kind) where.and('c.kind = ?', query.kind);
	if (query.sheets === 'approved') where.and(`${LATEST_APPROVED} > 0`);
	if (query.sheets === 'draft')
		where.and(`EXISTS (SELECT 1 FROM spec_sheets s WHERE s.component_id = c.id
			AND s.deleted_at IS NULL AND s.state = 'draft' AND s.sheet_version > ${LATEST_APPROVED})`);
	if (query.sheets === 'none')
		where.and(
			'NOT EXISTS (SELECT 1 FROM spec_sheets s WHERE s.component_id = c.id AND s.deleted_at IS NULL)'
		);
	whereSearch(where, query.q);
	const { ids, total } = await pageOfIds(
		'c.id',
		'components c',
		where,
		orderBy(query.sort, SORT_COLUMNS, 'c.id'),
		query.page,
		query.pageSize
	);
	const items = await withSheetVersions(actor, ids);
	return { items, total, page: query.page, pageSize: query.pageSize };
}

/** Components `ids` (in that order) with their newest approved and newer draft version. */
export async function withSheetVersions(actor: Actor, ids: string[]): Promise<ComponentItem[]> {
	if (!ids.length) return [];
	const rows = await Component.findAll({ where: { id: ids, workshopId: actor.workshopId } });
	const versions = await db().query<{ id: string; approved: number | null; draft: number | null }>(
		`SELECT component_id AS id,
			MAX(CASE WHEN state = 'approved' THEN sheet_version END) AS approved,
			MAX(CASE WHEN state = 'draft' THEN sheet_version END) AS draft
		 FROM spec_sheets WHERE workshop_id = ? AND deleted_at IS NULL AND component_id IN (?)
		 GROUP BY component_id`,
		{ replacements: [actor.workshopId, ids], type: QueryTypes.SELECT }
	);
	const byId = new Map(versions.map((v) => [v.id, v]));
	return inOrder(ids, rows).map((r) => {
		const v = byId.get(r.id);
		const approved = v?.approved == null ? null : Number(v.approved);
		const draft = v?.draft == null ? null : Number(v.draft);
		return {
			...(components.toRecord(r as never) as ComponentRecord),
			approvedVersion: approved,
			draftVersion: draft !== null && (approved === null || draft > approved) ? draft : null,
			updatedAt: r.get('updatedAt') as Date
		};
	});
}
