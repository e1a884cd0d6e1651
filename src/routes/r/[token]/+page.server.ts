import { error } from '@sveltejs/kit';
import { openReport } from '$lib/server/reports/service';
import { goneMessage } from './gone';

/** The customer's report by its link; no sign-in (the unguessable token is the key). */
export async function load({ params, setHeaders }) {
	setHeaders({ 'cache-control': 'no-store', 'x-robots-tag': 'noindex, nofollow' });
	const r = await openReport(params.token);
	if (r.state === 'unknown') error(404, goneMessage('unknown'));
	if (r.state !== 'open') error(410, goneMessage(r.state, r.workshopName));
	return { doc: r.doc, paper: r.paper, expiresAt: r.expiresAt.toISOString() };
}
