/** Workshops and their users. Writes are audited like every other write. */
import { v7 as uuidv7 } from 'uuid';
import { z } from 'zod';
import { hashPassword } from '../auth/password';
import { db } from '../db';
import { writeAudit } from '../db/feed';
import { ROLES, User, Workshop, type Role } from '../db/models';
import { ValidationError } from '../errors';
import { workshopTimeSchema } from '../../schemas/workshop-time';
import { refuseWorkshopSettings } from './rules';
import { defaultTimeZone } from '../../zoned-time';
import type { Actor } from '../auth/types';

export const newUser = z.object({
	email: z
		.email('Enter an e-mail address')
		.max(254)
		.transform((v) => v.toLowerCase()),
	name: z.string().trim().min(1, 'Enter a name').max(120),
	role: z.enum(ROLES),
	password: z.string().min(12, 'At least 12 characters').max(200)
});

/** Create a workshop and its change counter row; its time zone is the server's own unless given. */
export async function createWorkshop(name: string, id: string = uuidv7(), timeZone = defaultTimeZone()) {
	return db().transaction(async (t) => {
		const w = await Workshop.create({ id, name, timeZone }, { transaction: t });
		await db().query('INSERT IGNORE INTO change_counters (workshop_id, last_seq) VALUES (?, 0)', {
			replacements: [id],
			transaction: t
		});
		return w;
	});
}

/** Add a user to a workshop (argon2id hash); `by` is who did it, for the audit. */
export async function createUser(
	workshopId: string,
	input: unknown,
	by: Actor | null = null,
	id = uuidv7()
) {
	const r = newUser.safeParse(input);
	if (!r.success) throw ValidationError.fromZod(r.error);
	const passwordHash = await hashPassword(r.data.password);
	return db().transaction(async (t) => {
		const u = await User.create(
			{ id, workshopId, email: r.data.email, name: r.data.name, role: r.data.role, passwordHash },
			{ transaction: t }
		);
		const actor = by ?? { userId: id, workshopId, role: r.data.role as Role };
		await writeAudit(
			t,
			actor,
			'user',
			id,
			'create',
			[
				{ field: 'email', old: null, new: u.email },
				{ field: 'role', old: null, new: u.role }
			],
			null
		);
		return u;
	});
}

/** The workshop's users, for the lead's page. */
export async function listUsers(workshopId: string) {
	const rows = await User.findAll({
		where: { workshopId },
		order: [
			['role', 'DESC'],
			['name', 'ASC']
		]
	});
	return rows.map((u) => ({
		id: u.id,
		name: u.name,
		email: u.email,
		role: u.role,
		active: u.active
	}));
}

/** Names and roles of the workshop's people (no e-mail), for showing who did what. */
export async function listPeople(workshopId: string) {
	const rows = await User.findAll({ where: { workshopId }, attributes: ['id', 'name', 'role'], order: [['name', 'ASC']] });
	return rows.map((u) => ({ id: u.id, name: u.name, role: u.role }));
}

/** The workshop's IANA time zone (`UTC` if the workshop is not found). */
export async function timeZoneOf(workshopId: string): Promise<string> {
	const w = await Workshop.findByPk(workshopId, { attributes: ['timeZone'] });
	return w?.timeZone ?? 'UTC';
}

/**
 * Change the workshop's time zone (`{ timeZone }`, checked by `workshopTimeSchema`); the caller
 * checked the role. Audited with the old and new zone.
 */
export async function saveTimeZone(actor: Actor, input: unknown): Promise<string> {
	refuseWorkshopSettings(actor);
	const r = workshopTimeSchema.safeParse(input);
	if (!r.success) throw ValidationError.fromZod(r.error);
	return db().transaction(async (t) => {
		const w = await Workshop.findByPk(actor.workshopId, { transaction: t, lock: t.LOCK.UPDATE });
		if (!w) throw new ValidationError({ timeZone: 'This workshop is gone' });
		const old = w.timeZone;
		if (old !== r.data.timeZone) {
			await w.update({ timeZone: r.data.timeZone }, { transaction: t });
			await writeAudit(t, actor, 'workshop', w.id, 'update', [{ field: 'timeZone', old, new: r.data.timeZone }], null);
		}
		return r.data.timeZone;
	});
}
