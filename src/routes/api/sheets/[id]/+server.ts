import { api, readJson } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { discardDraft, readSheet, updateDraft } from '$lib/server/services/sheets';
import { idParam, splitBaseVersion } from '$lib/server/versioned';

/** GET /api/sheets/:id → { sheet, component } (404 across workshops) */
export const GET = api(async ({ params }, user) =>
	readSheet(actorOf(user), idParam(params.id, 'Sheet'))
);

/** PATCH /api/sheets/:id { baseVersion, checks?, source? } → { sheet } (409 when approved or stale) */
export const PATCH = api(async ({ params, request }, user) => {
	const id = idParam(params.id, 'Sheet');
	const { baseVersion, fields } = splitBaseVersion(await readJson(request));
	return { sheet: await updateDraft(actorOf(user), id, baseVersion, fields) };
});

/** DELETE /api/sheets/:id { baseVersion } → { sheet } (a draft only; its author or a lead) */
export const DELETE = api(async ({ params, request }, user) => {
	const id = idParam(params.id, 'Sheet');
	const { baseVersion } = splitBaseVersion(await readJson(request));
	return { sheet: await discardDraft(actorOf(user), id, baseVersion) };
});
