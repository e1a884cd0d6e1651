import { readReportSettingsForm } from '$lib/schemas/report';
import { guardPage, LEADS } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { failFrom, valuesOf } from '$lib/server/forms';
import { readReportSettings, saveReportSettings } from '$lib/server/reports/settings';

export async function load(event) {
	const user = guardPage(event, LEADS);
	return { settings: await readReportSettings(user.workshopId) };
}

export const actions = {
	default: async (event) => {
		const actor = actorOf(guardPage(event, LEADS));
		const fd = await event.request.formData();
		try {
			await saveReportSettings(actor, Number(fd.get('baseVersion')) || 0, readReportSettingsForm(fd));
		} catch (e) {
			return failFrom(e, valuesOf(fd));
		}
		return { saved: true };
	}
};
