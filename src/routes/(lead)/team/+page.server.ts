import { fail } from '@sveltejs/kit';
import { guardPage, LEADS } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { AppError, ValidationError } from '$lib/server/errors';
import { refuseWorkshopSettings } from '$lib/server/services/rules';
import { createUser, listUsers, saveTimeZone } from '$lib/server/services/workshops';
import { momentIn, timeZoneNames } from '$lib/zoned-time';
import { saveWindows, windowsOf } from '$lib/server/sync/scope';
import { syncWindowsSchema } from '$lib/schemas/sync-settings';

export async function load(event) {
	const user = guardPage(event, LEADS);
	const [users, windows] = await Promise.all([listUsers(user.workshopId), windowsOf(user.workshopId)]);
	const timeZone = user.timeZone ?? 'UTC';
	return { users, windows, timeZone, zones: timeZoneNames(), nowThere: momentIn(new Date(), timeZone) };
}

export const actions = {
	invite: async (event) => {
		const user = guardPage(event, LEADS);
		const data = Object.fromEntries(await event.request.formData()) as Record<string, string>;
		const keep = { name: data.name ?? '', email: data.email ?? '', role: data.role ?? '' };
		if (user.role === 'lead' && !['technician', 'apprentice'].includes(data.role)) {
			return fail(403, {
				...keep,
				fields: { role: 'Leads invite technicians and apprentices only' }
			});
		}
		try {
			await createUser(user.workshopId, data, actorOf(user));
		} catch (e) {
			if (e instanceof ValidationError) return fail(400, { ...keep, fields: e.fields });
			if (e instanceof AppError) return fail(e.status, { ...keep, fields: { _: e.message } });
			if ((e as { name?: string }).name === 'SequelizeUniqueConstraintError') {
				return fail(400, { ...keep, fields: { email: 'Someone already uses this e-mail' } });
			}
			throw e;
		}
		return { invited: keep.email };
	},
	/** What phones keep: how long a closed job stays on them (leads and owners). */
	windows: async (event) => {
		const user = guardPage(event, LEADS);
		refuseWorkshopSettings(actorOf(user));
		const data = Object.fromEntries(await event.request.formData()) as Record<string, string>;
		const values = { phoneDays: String(data.phoneDays ?? ''), deskDays: String(data.deskDays ?? '') };
		const parsed = syncWindowsSchema.safeParse(values);
		if (!parsed.success) {
			const windowFields: Record<string, string> = {};
			for (const i of parsed.error.issues) windowFields[String(i.path[0])] ??= i.message;
			return fail(400, { windowValues: values, windowFields });
		}
		await saveWindows(user.workshopId, user.id, parsed.data);
		return { windowsSaved: true };
	},
	/** The workshop's time zone: the office pages, reports and mails show times in it (leads and owners). */
	timeZone: async (event) => {
		const user = guardPage(event, LEADS);
		const data = await event.request.formData();
		const timeZone = String(data.get('timeZone') ?? '');
		try {
			await saveTimeZone(actorOf(user), { timeZone });
		} catch (e) {
			if (e instanceof ValidationError) return fail(400, { zoneValue: timeZone, zoneField: e.fields.timeZone ?? e.message });
			if (e instanceof AppError) return fail(e.status, { zoneValue: timeZone, zoneField: e.message });
			throw e;
		}
		return { zoneSaved: timeZone };
	}
};
