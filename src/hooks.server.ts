import type { Handle } from '@sveltejs/kit';
import { building } from '$app/environment';
import { readSession } from '$lib/server/auth/session';
import { closeDb, db } from '$lib/server/db';
import { errorBody } from '$lib/server/errors';
import { startMailWorker, stopMailWorker } from '$lib/server/mail/worker';
import { startPhotoCleanup, stopPhotoCleanup } from '$lib/server/photos/service';
import { refuseCrossSite, refuseUnreadableForm, shapeApiRefusal } from '$lib/server/request-rules';
import { applySecurityHeaders } from '$lib/server/security-headers';

db(); // registers the models once per server process

// adapter-node stops taking requests on SIGTERM/SIGINT and then emits this: close the
// database pool so the process ends (its idle connections would keep it alive).
// The e-mail worker stops first (a message under way is finished and recorded).
// The photo cleanup (objects of photos removed over 30 days ago) runs hourly in each process.
if (!building) {
	startMailWorker();
	startPhotoCleanup();
}
process.once('sveltekit:shutdown' as 'exit', () => {
	stopPhotoCleanup();
	void stopMailWorker().finally(closeDb);
});

export const handle: Handle = async ({ event, resolve }) => {
	// Another site's post, or a form post that is no form, never reaches a route.
	const refused = refuseCrossSite(event) ?? (await refuseUnreadableForm(event));
	if (refused) return applySecurityHeaders(refused, event);

	const { user, sessionId } = await readSession(event.cookies, event.url);
	event.locals.user = user;
	event.locals.sessionId = sessionId;

	// The technician's screens render in the browser (they must open offline), so their
	// server guard is here: with signal, a signed-out visitor goes to sign-in.
	if (!user && event.route.id?.startsWith('/(app)') && !event.isDataRequest) {
		const next = encodeURIComponent(event.url.pathname + event.url.search);
		return applySecurityHeaders(new Response(null, { status: 303, headers: { location: `/sign-in?next=${next}` } }), event);
	}
	if (event.url.pathname.startsWith('/api/') && !event.route.id) {
		return applySecurityHeaders(Response.json(errorBody('not_found', 'No such API route'), { status: 404 }), event);
	}
	// Fonts are preloaded too, so the text does not shift when the shipped font arrives.
	const response = await resolve(event, {
		preload: ({ type, path }) => type === 'js' || type === 'css' || (type === 'font' && path.endsWith('.woff2'))
	});
	return applySecurityHeaders(await shapeApiRefusal(event.url, response), event);
};
