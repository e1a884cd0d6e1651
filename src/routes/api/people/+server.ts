import { api } from '$lib/server/api';
import { listPeople } from '$lib/server/services/workshops';

/** GET /api/people → `{ items: [{ id, name, role }] }`: who is in the workshop (any member). */
export const GET = api(async (_event, user) => ({ items: await listPeople(user.workshopId) }));
