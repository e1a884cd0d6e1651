import { api, readJson } from '$lib/server/api';
import { LEADS } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { approveSheet } from '$lib/server/services/sheets';
import { idParam, splitBaseVersion } from '$lib/server/versioned';

/** POST /api/sheets/:id/approve { baseVersion } → { sheet } (leads and owners; 409 when stale) */
export const POST = api(
	async ({ params, request }, user) => {
		const id = idParam(params.id, 'Sheet');
		const { baseVersion } = splitBaseVersion(await readJson(request));
		return { sheet: await approveSheet(actorOf(user), id, baseVersion) };
	},
	{ roles: LEADS }
);
