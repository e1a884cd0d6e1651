import { error } from '@sveltejs/kit';
import { guardPage } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { sheetSummaries } from '$lib/server/services/components';
import { readSheet } from '$lib/server/services/sheets';
import { orNotFound } from '../../../load.server';

export async function load(event) {
	const user = guardPage(event);
	const { componentId, sheetId } = event.params;
	const { sheet, component } = await orNotFound(sheetId, () => readSheet(actorOf(user), sheetId));
	if (component.id !== componentId) error(404, { message: 'No such record in the library.' });
	const versions = await sheetSummaries(actorOf(user), componentId);
	const mine = versions.find((v) => v.id === sheet.id);
	return { sheet, component, versions, authoredByMe: mine?.createdBy === user.id };
}
