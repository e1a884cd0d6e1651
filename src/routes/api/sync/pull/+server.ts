import { api } from '$lib/server/api';
import { ValidationError } from '$lib/server/errors';
import { pullChanges } from '$lib/server/sync/pull';
import { describeFirstIssue, parsePullQuery } from '$lib/sync/protocol';

/** GET /api/sync/pull?cursor=N&limit=M → { changes, cursor, more } in the caller's scope. */
export const GET = api(async ({ url }, user) => {
	const q = parsePullQuery(url.searchParams);
	if (!q.success) {
		const { field, message } = describeFirstIssue(q.error);
		throw new ValidationError({ [field]: message });
	}
	return pullChanges(user, q.data.cursor, q.data.limit);
});
