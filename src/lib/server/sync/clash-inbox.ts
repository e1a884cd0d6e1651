/**
 * The clash inbox as the lead reads it (leads and owners): each open clash with its record
 * and field in the product's words, the value stored now and who stands behind it, and each
 * phone's value with who, which phone and when; and the clashes settled lately, with who
 * settled them and their note. Reads only; settling is `settle` in `sync/conflicts.ts`.
 */
import { QueryTypes } from 'sequelize';
import {
	choicesOf,
	ENTITY_WORDS,
	fieldWord,
	takesOwnValue,
	valueText,
	type FieldKind,
	type Names
} from '../../conflicts/words';
import type { ClashView, Edit } from '../../conflicts/view';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { Component, Customer, Job, SpecSheet, Test, User, Vehicle } from '../db/models';
import { NotFoundError } from '../errors';
import { toConflict } from './conflict-store';

type ConflictRow = Parameters<typeof toConflict>[0] & {
	created_at: Date;
	settled_by?: string;
	settled_at?: Date;
	settled_value?: string;
	settled_note?: string | null;
};

const iso = (d: Date | string | null | undefined) => (d ? new Date(d).toISOString() : null);
const vehicleText = (v: { make: string; model: string; plate: string | null }) =>
	[`${v.make} ${v.model}`, v.plate].filter(Boolean).join(' ');

/** Phones are numbered per person in the order first used (device ids are UUIDv7). */
async function screenNames(actor: Actor) {
	const rows = await db().query<{ device_id: string; user_id: string }>(
		'SELECT device_id, user_id FROM sync_devices WHERE workshop_id = ? ORDER BY device_id',
		{ replacements: [actor.workshopId], type: QueryTypes.SELECT }
	);
	const perUser = new Map<string, string[]>();
	for (const r of rows) perUser.set(r.user_id, [...(perUser.get(r.user_id) ?? []), r.device_id]);
	return (userId: string, deviceId: string | null) => {
		if (!deviceId || deviceId === 'web') return 'office screen';
		const list = perUser.get(userId) ?? [];
		const i = list.indexOf(deviceId);
		return list.length <= 1 || i < 0 ? 'phone' : `phone ${i + 1}`;
	};
}

/** "Job 1001 · Corvane Brisel TB24 KQL" and the office page of each record. */
async function recordLabels(actor: Actor, refs: { entity: string; id: string }[]) {
	const ids = (e: string) => [...new Set(refs.filter((r) => r.entity === e).map((r) => r.id))];
	const w = { workshopId: actor.workshopId };
	const [tests, sheets] = await Promise.all([
		Test.findAll({ where: { ...w, id: ids('test') } }),
		SpecSheet.findAll({ where: { ...w, id: ids('sheet') } })
	]);
	const jobIds = [...ids('job'), ...tests.map((t) => t.jobId)];
	const jobs = await Job.findAll({ where: { ...w, id: jobIds } });
	const [vehicles, customers, components] = await Promise.all([
		Vehicle.findAll({
			where: {
				...w,
				id: [...ids('vehicle'), ...jobs.flatMap((j) => (j.vehicleId ? [j.vehicleId] : []))]
			}
		}),
		Customer.findAll({ where: { ...w, id: ids('customer') } }),
		Component.findAll({
			where: { ...w, id: [...ids('component'), ...sheets.map((s) => s.componentId)] }
		})
	]);
	const v = new Map(vehicles.map((x) => [x.id, x]));
	const j = new Map(jobs.map((x) => [x.id, x]));
	const jobText = (id: string) => {
		const job = j.get(id);
		if (!job) return 'A job no longer on file';
		const car = job.vehicleId ? v.get(job.vehicleId) : undefined;
		return `Job ${job.number}${car ? ` · ${vehicleText(car)}` : ''}`;
	};
	const labels = new Map<string, { text: string; href: string | null }>();
	for (const id of ids('job')) labels.set(id, { text: jobText(id), href: `/jobs/${id}` });
	for (const x of vehicles)
		labels.set(x.id, { text: `Vehicle ${vehicleText(x)}`, href: `/vehicles/${x.id}` });
	for (const x of customers)
		labels.set(x.id, { text: `Customer ${x.name}`, href: `/customers/${x.id}` });
	for (const x of tests)
		labels.set(x.id, {
			text: `Test of ${x.partNumber ?? 'a part'} · ${jobText(x.jobId)}`,
			href: `/jobs/${x.jobId}#test-${x.id}`
		});
	const c = new Map(components.map((x) => [x.id, x]));
	for (const x of components)
		labels.set(x.id, { text: `Part ${x.partNumber}`, href: `/library/${x.id}` });
	for (const x of sheets)
		labels.set(x.id, {
			text: `Spec sheet version ${x.sheetVersion} of ${c.get(x.componentId)?.partNumber ?? 'a part'}`,
			href: `/library/${x.componentId}/sheets/${x.id}`
		});
	return (entity: string, id: string) =>
		labels.get(id) ?? { text: `${ENTITY_WORDS[entity] ?? 'Record'} no longer on file`, href: null };
}

/** People, customers and vehicles that the clashing values name. */
async function namesFor(
	actor: Actor,
	values: { kind: FieldKind; value: unknown }[]
): Promise<Names> {
	const ids = (k: FieldKind) =>
		values.filter((x) => x.kind === k && typeof x.value === 'string').map((x) => x.value as string);
	const w = { workshopId: actor.workshopId };
	const [users, customers, vehicles] = await Promise.all([
		User.findAll({ where: w, attributes: ['id', 'name'] }),
		Customer.findAll({ where: { ...w, id: ids('customer') } }),
		Vehicle.findAll({ where: { ...w, id: ids('vehicle') } })
	]);
	return {
		people: new Map(users.map((u) => [u.id, u.name])),
		customers: new Map(customers.map((x) => [x.id, x.name])),
		vehicles: new Map(vehicles.map((x) => [x.id, vehicleText(x)]))
	};
}

/** Who last changed each clashing field, from the audit log (when no phone stands behind it). */
async function lastChanges(
	actor: Actor,
	list: { entity: string; entityId: string; field: string }[]
) {
	if (!list.length)
		return new Map<string, { user_id: string | null; device_id: string | null; at: Date }>();
	const rows = await db().query<{
		entity_id: string;
		field: string;
		user_id: string | null;
		device_id: string | null;
		at: Date;
	}>(
		`SELECT a.entity_id, a.field, a.user_id, a.device_id, a.at FROM audit_log a
		 WHERE a.entity IN (?) AND a.entity_id IN (?) AND a.workshop_id = ? AND a.field IN (?) ORDER BY a.id`,
		{
			replacements: [
				list.map((x) => x.entity),
				list.map((x) => x.entityId),
				actor.workshopId,
				list.map((x) => x.field)
			],
			type: QueryTypes.SELECT
		}
	);
	return new Map(rows.map((r) => [`${r.entity_id}|${r.field}`, r]));
}

/** The workshop's open clashes, oldest first, in the product's words. */
export async function listInbox(actor: Actor): Promise<ClashView[]> {
	const rows = await db().query<ConflictRow>(
		"SELECT * FROM conflicts WHERE workshop_id = ? AND status = 'open' ORDER BY created_at",
		{ replacements: [actor.workshopId], type: QueryTypes.SELECT }
	);
	const list = rows.map((r) => ({ ...toConflict(r), openedAt: iso(r.created_at)! }));
	const kinds = list.map((c) => fieldWord(c.entity, c.field).kind);
	const [screen, label, names, audit] = await Promise.all([
		screenNames(actor),
		recordLabels(
			actor,
			list.map((c) => ({ entity: c.entity, id: c.entityId }))
		),
		namesFor(
			actor,
			list.flatMap((c, i) =>
				[c.server.value, ...c.candidates.map((k) => k.value)].map((value) => ({
					kind: kinds[i],
					value
				}))
			)
		),
		lastChanges(actor, list)
	]);
	const who = (userId: string | null) =>
		userId ? (names.people.get(userId) ?? 'Someone no longer in the workshop') : 'Someone';
	return list.map((c, i) => {
		const word = fieldWord(c.entity, c.field);
		const last = audit.get(`${c.entityId}|${c.field}`);
		const by: Edit[] = c.server.writers.length
			? c.server.writers.map((w) => ({
					who: who(w.userId),
					screen: screen(w.userId, w.deviceId),
					at: w.deviceTime
				}))
			: last
				? [
						{
							who: who(last.user_id),
							screen: screen(last.user_id ?? '', last.device_id),
							at: iso(last.at)
						}
					]
				: [];
		const rec = label(c.entity, c.entityId);
		return {
			id: c.conflictId,
			record: rec.text,
			href: rec.href,
			field: c.field,
			fieldLabel: word.label,
			kind: kinds[i],
			openedAt: c.openedAt,
			stored: { text: valueText(word.kind, c.server.value, names), by },
			candidates: c.candidates.map((k) => ({
				deviceId: k.deviceId,
				text: valueText(word.kind, k.value, names),
				who: who(k.userId),
				screen: screen(k.userId, k.deviceId),
				at: k.deviceTime
			})),
			choices: choicesOf(word.kind),
			ownValue: takesOwnValue(word.kind)
		};
	});
}

/** Clashes settled lately: what was kept, who settled it, when, and the note. */
export async function listSettled(actor: Actor, limit = 10) {
	const rows = await db().query<ConflictRow>(
		`SELECT * FROM conflicts WHERE workshop_id = ? AND status = 'settled' ORDER BY settled_at DESC LIMIT ${Math.max(1, Math.min(100, limit))}`,
		{ replacements: [actor.workshopId], type: QueryTypes.SELECT }
	);
	const list = rows.map((r) => ({ c: toConflict(r), r }));
	const kinds = list.map(({ c }) => fieldWord(c.entity, c.field).kind);
	const values = list.map(({ r }) =>
		r.settled_value == null ? null : JSON.parse(r.settled_value)
	);
	const [label, names] = await Promise.all([
		recordLabels(
			actor,
			list.map(({ c }) => ({ entity: c.entity, id: c.entityId }))
		),
		namesFor(
			actor,
			values.map((value, i) => ({ kind: kinds[i], value }))
		)
	]);
	return list.map(({ c, r }, i) => ({
		id: c.conflictId,
		record: label(c.entity, c.entityId).text,
		href: label(c.entity, c.entityId).href,
		fieldLabel: fieldWord(c.entity, c.field).label,
		kept: valueText(kinds[i], values[i], names),
		by: r.settled_by
			? (names.people.get(r.settled_by) ?? 'Someone no longer in the workshop')
			: 'Someone',
		at: iso(r.settled_at),
		note: r.settled_note ?? null
	}));
}

/** The record and field of one of the workshop's clashes (404 otherwise). */
export async function conflictField(actor: Actor, id: string) {
	const [row] = await db().query<{ entity: string; field: string }>(
		'SELECT entity, field FROM conflicts WHERE id = ? AND workshop_id = ?',
		{ replacements: [id, actor.workshopId], type: QueryTypes.SELECT }
	);
	if (!row) throw new NotFoundError('Clash');
	return row;
}
