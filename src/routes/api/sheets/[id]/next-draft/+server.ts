import { api } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { startNextDraft } from '$lib/server/services/sheets';
import { idParam } from '$lib/server/versioned';

/** POST /api/sheets/:id/next-draft → 201 { sheet }: the component's next version, a copy of this one */
export const POST = api(async ({ params }, user) => {
	const sheet = await startNextDraft(actorOf(user), idParam(params.id, 'Sheet'));
	return Response.json({ sheet }, { status: 201 });
});
