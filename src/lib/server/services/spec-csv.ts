/**
 * The spec library as CSV (layout in `src/lib/library/csv-layout.ts`, documented in
 * docs/csv-layout.md). Export writes the workshop's live components and sheets; import makes the
 * library match the file for the components it lists, in ONE transaction:
 *  1. read and validate the whole file (every problem with its line and column);
 *  2. per component: create it, or update the fields that differ;
 *  3. per sheet version: create it with the file's version and state, leave an identical
 *     one alone, update a differing draft (approving it when the file says approved), and
 *     refuse a differing approved version — it never changes.
 * Any problem rolls the whole file back. Only leads and owners import (it may approve).
 */
import { Op, type Transaction } from 'sequelize';
import {
	readLibraryCsv,
	sheetLines,
	writeLibraryCsv,
	type CsvIssue,
	type ImportEntry,
	type LibraryEntry,
	type LibrarySheet
} from '../../library/csv-layout';
import type { ComponentRecord, SheetRecord } from '../../schemas/component';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { Component, SpecSheet } from '../db/models';
import { AppError, ForbiddenError, ValidationError } from '../errors';
import {
	components,
	createComponent,
	importedSheets,
	listComponents,
	sheets,
	updateComponent
} from './components';

/** 400 for a file with problems: `lines` lists each with its line and column; nothing was imported. */
export class CsvImportError extends ValidationError {
	constructor(readonly lines: CsvIssue[]) {
		const first = lines[0];
		super(
			Object.fromEntries(lines.map((l) => [`line.${l.line}.${l.column}`, l.message])),
			`Line ${first.line}, column ${first.column || '—'}: ${first.message}. Nothing was imported.`
		);
		Object.assign(this.extra, { lines });
	}
}

/** The largest file accepted, in characters. */
export const MAX_CSV_CHARS = 2 * 1024 * 1024;

/** The workshop's live library (or the part matching a list query) as one CSV text. */
export async function exportLibrary(
	actor: Actor,
	query: Record<string, string>,
	delimiter: ',' | ';' = ','
): Promise<string> {
	const ids: string[] = [];
	for (let page = 1; ; page++) {
		const p = await listComponents(actor, { ...query, page, pageSize: 100 });
		ids.push(...p.items.map((i) => i.id));
		if (page * 100 >= p.total) break;
	}
	const rows = ids.length
		? await Component.findAll({ where: { id: ids, workshopId: actor.workshopId } })
		: [];
	const byId = new Map(rows.map((r) => [r.id, components.toRecord(r as never) as ComponentRecord]));
	const sheetRows = ids.length
		? await SpecSheet.findAll({
				where: { workshopId: actor.workshopId, componentId: ids, deletedAt: null },
				order: [['sheetVersion', 'ASC']]
			})
		: [];
	const entries: LibraryEntry[] = ids.map((id) => ({
		component: byId.get(id)!,
		sheets: sheetRows
			.filter((s) => s.componentId === id)
			.map((s) => sheets.toRecord(s as never) as SheetRecord as LibrarySheet)
	}));
	return writeLibraryCsv(entries, delimiter);
}

export type ImportSummary = {
	components: { created: number; updated: number; unchanged: number };
	sheets: { created: number; updated: number; approved: number; unchanged: number };
};

/** Import a library file (see the module comment); 400 `CsvImportError` with every problem. */
export async function importLibrary(actor: Actor, text: string): Promise<ImportSummary> {
	if (actor.role !== 'lead' && actor.role !== 'owner')
		throw new ForbiddenError('Only a workshop lead or owner imports spec sheets');
	if (text.length > MAX_CSV_CHARS)
		throw new AppError(413, 'too_large', 'The file is larger than 2 MiB');
	const { entries, issues } = readLibraryCsv(text);
	if (issues.length) throw new CsvImportError(issues);
	if (!entries.length)
		throw new CsvImportError([
			{ line: 2, column: 'record', message: 'No component lines in the file' }
		]);
	const summary: ImportSummary = {
		components: { created: 0, updated: 0, unchanged: 0 },
		sheets: { created: 0, updated: 0, approved: 0, unchanged: 0 }
	};
	await db().transaction(async (t) => {
		for (const e of entries) await importEntry(actor, e, summary, t);
	});
	return summary;
}

const sameJson = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);
const COMPONENT_KEYS = [
	'partNumber',
	'kind',
	'description',
	'fitment',
	'cautions',
	'positions'
] as const;

async function importEntry(actor: Actor, e: ImportEntry, summary: ImportSummary, t: Transaction) {
	const found = await Component.findOne({
		where: { workshopId: actor.workshopId, partNumber: e.partNumber },
		transaction: t,
		lock: t.LOCK.UPDATE
	});
	if (found?.deletedAt)
		throw new CsvImportError([
			{ line: e.line, column: 'part_number', message: 'A removed component had this part number' }
		]);
	let componentId: string;
	if (!found) {
		componentId = (
			(await createComponent(actor, e.component, { transaction: t })) as ComponentRecord
		).id;
		summary.components.created++;
	} else {
		componentId = found.id;
		const current = components.toRecord(found as never) as Record<string, unknown>;
		const patch = Object.fromEntries(
			COMPONENT_KEYS.filter((k) => !sameJson(current[k] ?? null, e.component[k] ?? null)).map(
				(k) => [k, e.component[k]]
			)
		);
		if (Object.keys(patch).length) {
			await updateComponent(actor, found.id, found.version, patch, { transaction: t });
			summary.components.updated++;
		} else summary.components.unchanged++;
	}
	for (const s of e.sheets) await importSheet(actor, componentId, e.partNumber, s, summary, t);
}

async function importSheet(
	actor: Actor,
	componentId: string,
	partNumber: string,
	s: ImportEntry['sheets'][number],
	summary: ImportSummary,
	t: Transaction
) {
	const approval =
		s.state === 'approved'
			? { approvedBy: actor.userId, approvedAt: new Date() }
			: { approvedBy: null, approvedAt: null };
	const row = await SpecSheet.findOne({
		where: { workshopId: actor.workshopId, componentId, sheetVersion: s.sheetVersion },
		transaction: t,
		lock: t.LOCK.UPDATE
	});
	if (!row) {
		await importedSheets.create(
			actor,
			{
				componentId,
				checks: s.checks,
				source: s.source ?? null,
				sheetVersion: s.sheetVersion,
				state: s.state,
				...approval
			},
			{ transaction: t }
		);
		summary.sheets.created++;
		return;
	}
	const bad = (message: string) =>
		new CsvImportError([{ line: s.line, column: 'sheet_version', message }]);
	if (row.deletedAt)
		throw bad(`Version ${s.sheetVersion} was discarded; give these figures another version`);
	const stored = sheets.toRecord(row as never) as SheetRecord;
	const lines = (x: LibrarySheet) =>
		JSON.stringify(sheetLines(partNumber, { ...x, state: 'draft' }));
	const sameFigures = lines(stored) === lines({ ...s, source: s.source ?? null });
	if (stored.state === 'approved') {
		if (sameFigures && s.state === 'approved') return void summary.sheets.unchanged++;
		throw bad(
			sameFigures
				? `Version ${s.sheetVersion} is approved in the library; this file calls it a draft`
				: `Version ${s.sheetVersion} is approved in the library and differs from this file; approved versions never change, so give the new figures a new version`
		);
	}
	let version = row.version;
	if (!sameFigures) {
		version = (
			(await sheets.update(
				actor,
				row.id,
				version,
				{ checks: s.checks, source: s.source ?? null },
				{ transaction: t }
			)) as SheetRecord
		).version;
		summary.sheets.updated++;
	}
	if (s.state === 'approved') {
		const newer = await SpecSheet.count({
			where: {
				workshopId: actor.workshopId,
				componentId,
				deletedAt: null,
				state: 'approved',
				sheetVersion: { [Op.gt]: s.sheetVersion }
			},
			transaction: t
		});
		if (newer)
			throw bad(`A newer version is already approved; version ${s.sheetVersion} stays a draft`);
		await sheets.update(actor, row.id, version, {}, { transaction: t, serverFields: approval });
		summary.sheets.approved++;
	} else if (sameFigures) summary.sheets.unchanged++;
}
