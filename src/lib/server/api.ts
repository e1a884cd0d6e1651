/**
 * Wraps every JSON handler: the signed-in check (401), the role check (403), and one error
 * body for everything thrown (DESIGN §5).
 */
import type { RequestEvent } from '@sveltejs/kit';
import { requireRole, requireUser } from './auth/guards';
import type { SessionUser } from './auth/types';
import type { Role } from './db/models';
import { compressFor } from './compress';
import { AppError, toErrorResponse, ValidationError } from './errors';

type Handler = (event: RequestEvent, user: SessionUser) => Promise<Response | unknown>;

export function api(fn: Handler, opts: { roles?: readonly Role[] } = {}) {
	return async (event: RequestEvent): Promise<Response> => {
		try {
			const user = opts.roles ? requireRole(event.locals, opts.roles) : requireUser(event.locals);
			const out = await fn(event, user);
			return out instanceof Response ? out : Response.json(out);
		} catch (err) {
			return toErrorResponse(err);
		}
	};
}

/**
 * An answer whose JSON text is already written (the sync pull writes its own,
 * `sync/pull-json.ts`), compressed in one go as `request` accepts (`compress.ts`). With
 * `since` (a `performance.now()`), a `Server-Timing` header says how long the handler took
 * (`handler;dur=…` in ms, W3C Server Timing; the compression included), for benchmarks and
 * the browser's network panel.
 */
export async function jsonText(request: Request, body: Uint8Array, since?: number): Promise<Response> {
	const out = await compressFor(request.headers.get('accept-encoding'), body);
	const headers: Record<string, string> = { 'content-type': 'application/json', vary: 'Accept-Encoding' };
	if (out.encoding) headers['content-encoding'] = out.encoding;
	if (since !== undefined) headers['server-timing'] = `handler;dur=${(performance.now() - since).toFixed(1)}`;
	return new Response(out.body as BodyInit, { headers }); // a Buffer is a valid body (its type says ArrayBufferLike)
}

/** Parse the JSON body; a malformed body is a 400 like any invalid input. */
export async function readJson(request: Request): Promise<unknown> {
	try {
		return await request.json();
	} catch {
		throw new ValidationError({ _: 'The body is not valid JSON' }, 'Malformed JSON');
	}
}

export { AppError };
