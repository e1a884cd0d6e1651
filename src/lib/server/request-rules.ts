/**
 * Refusals made before a request reaches its route, and the one error body for the API's own
 * refusals (OWASP ASVS 5.0 §3.5):
 *  - a request that changes something (any method but GET, HEAD, OPTIONS) from another site
 *    is refused: its `Origin` must be this app's; without one, `Sec-Fetch-Site` must say the
 *    same origin, and a form-typed body (the kinds another site can send without asking) is
 *    refused outright. A non-browser client sends JSON without an `Origin` and passes, as no
 *    browser can be made to send such a request to another site. (This replaces SvelteKit's
 *    own origin check, which covers form-typed bodies only and answers in its own words.)
 *  - a form post whose body is not a form, or cannot be read as one, is refused (415, 400)
 *    instead of failing inside the action;
 *  - an API answer of 4xx or 5xx that is not JSON (SvelteKit's 405 for a method a route does
 *    not have, say) is given the one error body `{ error: { code, message } }`.
 */
import type { RequestEvent } from '@sveltejs/kit';
import { errorBody } from './errors';

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);
const FORM_TYPES = /^\s*(application\/x-www-form-urlencoded|multipart\/form-data|text\/plain)\b/i;
const READABLE_FORM = /^\s*(application\/x-www-form-urlencoded|multipart\/form-data)\b/i;

const isApi = (url: URL) => url.pathname.startsWith('/api/');

/** A refusal in the shape its caller reads: the API's error body, an action result, or text. */
function refusal(event: Pick<RequestEvent, 'url' | 'request'>, status: number, code: string, message: string): Response {
	if (isApi(event.url)) return Response.json(errorBody(code, message), { status });
	if (event.request.headers.get('x-sveltekit-action') === 'true') {
		return Response.json({ type: 'error', error: { message } }, { status });
	}
	return new Response(message, { status, headers: { 'content-type': 'text/plain; charset=utf-8' } });
}

/** Whether a state-changing request comes from this app's own pages (or from no browser at all). */
export function isSameOrigin(request: Request, url: URL): boolean {
	if (SAFE.has(request.method)) return true;
	const origin = request.headers.get('origin');
	if (origin) return origin === url.origin;
	const site = request.headers.get('sec-fetch-site');
	if (site) return site === 'same-origin';
	return !FORM_TYPES.test(request.headers.get('content-type') ?? '');
}

/** 403 for a state-changing request from another site; null to go on. */
export function refuseCrossSite(event: Pick<RequestEvent, 'url' | 'request'>): Response | null {
	if (isSameOrigin(event.request, event.url)) return null;
	return refusal(event, 403, 'cross_site', 'This request came from another site and was refused.');
}

/** 415 or 400 for a post to a page (a form action) whose body is not a readable form; null to go on. */
export async function refuseUnreadableForm(event: Pick<RequestEvent, 'url' | 'request'>): Promise<Response | null> {
	if (event.request.method !== 'POST' || isApi(event.url)) return null;
	if (!READABLE_FORM.test(event.request.headers.get('content-type') ?? '')) {
		return refusal(event, 415, 'unsupported_media_type', 'Send the form as a form.');
	}
	try {
		await event.request.clone().formData();
		return null;
	} catch {
		return refusal(event, 400, 'invalid', 'The form could not be read. Try again.');
	}
}

const CODES: Record<number, string> = {
	400: 'invalid',
	401: 'signed_out',
	403: 'forbidden',
	404: 'not_found',
	405: 'method_not_allowed',
	413: 'too_large',
	415: 'unsupported_media_type',
	429: 'throttled'
};

/** An API refusal that is not JSON, given the one error body (its status and headers kept). */
export async function shapeApiRefusal(url: URL, response: Response): Promise<Response> {
	if (!isApi(url) || response.status < 400) return response;
	if ((response.headers.get('content-type') ?? '').includes('application/json')) return response;
	const text = (await response.text()).trim().slice(0, 300);
	const code = CODES[response.status] ?? (response.status >= 500 ? 'server_error' : 'refused');
	const message = response.status >= 500 ? 'Something went wrong on the server' : text || 'Refused';
	const headers = new Headers(response.headers);
	headers.set('content-type', 'application/json');
	headers.delete('content-length');
	return new Response(JSON.stringify(errorBody(code, message)), { status: response.status, headers });
}
