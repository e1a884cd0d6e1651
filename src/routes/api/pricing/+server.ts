/**
 * The workshop's pricing and price list for the phone, which keeps a copy to make quotes
 * offline (the server prices them again when they arrive). Any signed-in member.
 */
import { api } from '$lib/server/api';
import { listPriceItems, readPricing } from '$lib/server/quotes/pricing';

export const GET = api(async (_event, user) => ({
	pricing: await readPricing(user.workshopId),
	items: await listPriceItems(user.workshopId)
}));
