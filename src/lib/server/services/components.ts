/** Components and spec sheets on the one write path. */
import { QueryTypes } from 'sequelize';
import { componentCreate, componentPatch, sheetCreate, sheetPatch } from '../../schemas/component';
import { db } from '../db';
import { Component, SpecSheet } from '../db/models';
import { defineAggregate } from './write-path';

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
	toRecord: (r) => ({
		id: r.id,
		version: r.version,
		...Object.fromEntries(COMPONENT_FIELDS.map((f) => [f, r.get(f)])),
		deleted: r.deletedAt != null
	})
});

export const sheets = defineAggregate({
	entity: 'sheet',
	model: SpecSheet,
	createSchema: sheetCreate,
	patchSchema: sheetPatch,
	prepareCreate: async (actor, fields, t) => {
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
	toRecord: (r) => ({
		id: r.id,
		version: r.version,
		...Object.fromEntries(SHEET_FIELDS.map((f) => [f, r.get(f)])),
		deleted: r.deletedAt != null
	})
});
