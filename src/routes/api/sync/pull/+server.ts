import { api, jsonText } from '$lib/server/api';
import { ValidationError } from '$lib/server/errors';
import { pullChanges, pullV2 } from '$lib/server/sync/pull';
import { describeFirstIssue, parsePullQuery } from '$lib/sync/protocol';

/**
 * GET /api/sync/pull?cursor=N&limit=M → { changes, cursor, more } in the caller's scope;
 * with `v=2` a snapshot first when the cursor is 0 or older than the feed keeps
 * (`&snapshot=` continues one; see `server/sync/pull.ts`).
 */
export const GET = api(async ({ url, request }, user) => {
	const since = performance.now();
	const q = parsePullQuery(url.searchParams);
	if (!q.success) {
		const { field, message } = describeFirstIssue(q.error);
		throw new ValidationError({ [field]: message });
	}
	if (q.data.v === 2) return jsonText(request, await pullV2(user, q.data.cursor, q.data.limit, q.data.snapshot), since);
	return jsonText(request, await pullChanges(user, q.data.cursor, q.data.limit), since);
});
