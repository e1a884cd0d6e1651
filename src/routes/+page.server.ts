import { checkHealth } from '$lib/server/health';

export async function load() {
	return { health: await checkHealth() };
}
