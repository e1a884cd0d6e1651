import { json } from '@sveltejs/kit';
import { checkHealth } from '$lib/server/health';

export async function GET() {
	const health = await checkHealth();
	return json(health, { status: health.ok ? 200 : 503 });
}
