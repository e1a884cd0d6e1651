import type { Handle } from '@sveltejs/kit';
import { building } from '$app/environment';
import { readSession } from '$lib/server/auth/session';
import { closeDb, db } from '$lib/server/db';
import { errorBody } from '$lib/server/errors';
import { startMailWorker, stopMailWorker } from '$lib/server/mail/worker';

db(); // registers the models once per server process

// adapter-node stops taking requests on SIGTERM/SIGINT and then emits this: close the
// database pool so the process ends (its idle connections would keep it alive).
// The e-mail worker stops first (a message under way is finished and recorded).
if (!building) startMailWorker();
process.once('sveltekit:shutdown' as 'exit', () => void stopMailWorker().finally(closeDb));

export const handle: Handle = async ({ event, resolve }) => {
	const { user, sessionId } = await readSession(event.cookies, event.url);
	event.locals.user = user;
	event.locals.sessionId = sessionId;

	// The technician's screens render in the browser (they must open offline), so their
	// server guard is here: with signal, a signed-out visitor goes to sign-in.
	if (!user && event.route.id?.startsWith('/(app)') && !event.isDataRequest) {
		const next = encodeURIComponent(event.url.pathname + event.url.search);
		return new Response(null, { status: 303, headers: { location: `/sign-in?next=${next}` } });
	}
	if (event.url.pathname.startsWith('/api/') && !event.route.id) {
		return Response.json(errorBody('not_found', 'No such API route'), { status: 404 });
	}
	// Fonts are preloaded too, so the text does not shift when the shipped font arrives.
	const response = await resolve(event, {
		preload: ({ type, path }) => type === 'js' || type === 'css' || (type === 'font' && path.endsWith('.woff2'))
	});
	response.headers.set('X-Content-Type-Options', 'nosniff');
	response.headers.set('Referrer-Policy', 'same-origin');
	response.headers.set('X-Frame-Options', 'DENY');
	response.headers.set('Permissions-Policy', 'geolocation=(), microphone=()');
	return response;
};
