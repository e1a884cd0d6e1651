/**
 * Spec sheets: drafts by anyone, approval by a lead or owner, and an approved version that
 * never changes (DESIGN §2.2, §6). Every write goes through the `sheets` aggregate in
 * `components.ts` (the one write path), whose rules (`sheetRules` in `rules.ts`) hold for
 * every channel; this module adds the use cases around it:
 *
 * - a draft is edited at the version its editor saw (409 with the current record otherwise);
 * - an approved sheet refuses every edit and removal (409 `sheet_approved`): the client
 *   starts the next draft from it, which copies its checks into a new version;
 * - approving needs a lead or owner (403) and refuses a draft older than an approved
 *   version (409 `superseded`);
 * - a draft is discarded by its author or by a lead or owner (403 otherwise).
 */
import { Op, type Transaction } from 'sequelize';
import { z } from 'zod';
import { pageParam, pageSizeParam, sortParam, type ListPage } from '../../schemas/common';
import type { ComponentRecord, SheetRecord } from '../../schemas/component';
import type { Actor } from '../auth/types';
import { SpecSheet } from '../db/models';
import { AppError, NotFoundError, SheetApprovedError, ValidationError } from '../errors';
import { components, sheets } from './components';
import { inTransaction } from './write-path';

export { SheetApprovedError };

const record = (row: SpecSheet) => sheets.toRecord(row as never) as SheetRecord;

/** The live sheet `id` of the actor's workshop, locked for the transaction (404 otherwise). */
async function lockSheet(actor: Actor, id: string, t: Transaction) {
	const row = await SpecSheet.findOne({
		where: { id, workshopId: actor.workshopId, deletedAt: null },
		transaction: t,
		lock: t.LOCK.UPDATE
	});
	if (!row) throw new NotFoundError('Sheet');
	return row;
}

/** One sheet with its component (404 across workshops). */
export async function readSheet(actor: Actor, id: string) {
	const sheet = (await sheets.read(actor, id)) as SheetRecord;
	const component = (await components.read(actor, sheet.componentId)) as ComponentRecord;
	return { sheet, component };
}

/** Start a draft for a component of the workshop (anyone; 404 for another workshop's component). */
export async function createDraft(actor: Actor, input: unknown) {
	return (await sheets.create(actor, input)) as SheetRecord;
}

/** Change a draft seen at `baseVersion` (anyone): 409 when approved (`sheetRules`) or stale. */
export async function updateDraft(actor: Actor, id: string, baseVersion: number, input: unknown) {
	return (await sheets.update(actor, id, baseVersion, input)) as SheetRecord;
}

/**
 * Approve the draft a lead or owner reviewed at `baseVersion`: 403 for other roles, 409 when
 * it changed since, when it is already approved, or when a newer version is approved.
 */
export async function approveSheet(actor: Actor, id: string, baseVersion: number) {
	return inTransaction(undefined, async (t) => {
		const row = await lockSheet(actor, id, t);
		const newer = await SpecSheet.findOne({
			where: {
				workshopId: actor.workshopId,
				componentId: row.componentId,
				deletedAt: null,
				state: 'approved',
				sheetVersion: { [Op.gt]: row.sheetVersion }
			},
			order: [['sheetVersion', 'DESC']],
			transaction: t
		});
		if (newer)
			throw new AppError(
				409,
				'superseded',
				`Version ${newer.sheetVersion} is already approved; start the next draft from it`,
				{ current: record(newer) }
			);
		return (await sheets.update(
			actor,
			id,
			baseVersion,
			{},
			{
				transaction: t,
				serverFields: { state: 'approved', approvedBy: actor.userId, approvedAt: new Date() }
			}
		)) as SheetRecord;
	});
}

/** A new draft (the component's next version) with the checks and source of sheet `id`. */
export async function startNextDraft(actor: Actor, id: string) {
	return inTransaction(undefined, async (t) => {
		const from = await lockSheet(actor, id, t);
		const input = { componentId: from.componentId, checks: from.checks, source: from.source };
		return (await sheets.create(actor, input, { transaction: t })) as SheetRecord;
	});
}

/** Discard a draft seen at `baseVersion` (a tombstone): its author, a lead or an owner (`sheetRules`). */
export async function discardDraft(actor: Actor, id: string, baseVersion: number) {
	return inTransaction(undefined, async (t) => {
		const row = await lockSheet(actor, id, t); // a discarded draft is not found again
		return (await sheets.remove(actor, row.id, baseVersion, { transaction: t })) as SheetRecord;
	});
}

/** The newest approved sheet of a component, or null: what a new test pins. */
export async function currentApproved(actor: Actor, componentId: string) {
	const row = await SpecSheet.findOne({
		where: { workshopId: actor.workshopId, componentId, deletedAt: null, state: 'approved' },
		order: [['sheetVersion', 'DESC']]
	});
	return row ? record(row) : null;
}

export const sheetListQuery = z.object({
	componentId: z.uuid('Not a valid id').optional(),
	state: z.enum(['draft', 'approved'], { error: 'One of: draft, approved' }).optional(),
	sort: sortParam(['sheetVersion', 'updatedAt'] as const, '-sheetVersion'),
	page: pageParam,
	pageSize: pageSizeParam(20)
});

/** One page of the workshop's live sheets, optionally of one component and in one state. */
export async function listSheets(actor: Actor, input: unknown): Promise<ListPage<SheetRecord>> {
	const r = sheetListQuery.safeParse(input);
	if (!r.success) throw ValidationError.fromZod(r.error);
	const q = r.data;
	const desc = q.sort.startsWith('-');
	const { rows, count } = await SpecSheet.findAndCountAll({
		where: {
			workshopId: actor.workshopId,
			deletedAt: null,
			...(q.componentId ? { componentId: q.componentId } : {}),
			...(q.state ? { state: q.state } : {})
		},
		order: [
			[desc ? q.sort.slice(1) : q.sort, desc ? 'DESC' : 'ASC'],
			['id', 'ASC']
		],
		limit: q.pageSize,
		offset: (q.page - 1) * q.pageSize
	});
	return { items: rows.map(record), total: count, page: q.page, pageSize: q.pageSize };
}
