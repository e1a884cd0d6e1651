import { api } from '$lib/server/api';

/** GET /api/me → the signed-in user, role and workshop. */
export const GET = api(async (_event, user) => ({ user }));
