/**
 * Which address the app is at, per request, when it is served on this machine without a
 * fixed ORIGIN (what `npm start` and the tests do).
 *
 * SvelteKit refuses a form post whose Origin header differs from the app's own origin
 * (`url.origin`), and adapter-node builds that origin from ORIGIN, or else from the request
 * (PROTOCOL_HEADER, which defaults to https, and the Host header). Pinning ORIGIN to one name
 * made the other loopback name answer 403 to every form; so instead each request gets the
 * protocol it really came in with (plain http: this server does no TLS) through a header of
 * our own, overwritten on every request so a client cannot set it, and the app's origin is
 * the address the browser used — http://127.0.0.1:PORT, http://localhost:PORT or
 * http://[::1]:PORT, on whatever port. SvelteKit's check itself is unchanged: a form posted
 * from any other origin is still refused.
 *
 * Bound to loopback, the server also refuses (421) a Host that is not a loopback name, so a
 * page on another site whose name was pointed at 127.0.0.1 (DNS rebinding) cannot talk to it
 * as a site of its own.
 *
 * With ORIGIN (or PROTOCOL_HEADER) set — behind a proxy, say — nothing here applies and
 * adapter-node's own rules do.
 */

/** The header adapter-node reads the protocol from (PROTOCOL_HEADER); set on every request. */
export const PROTOCOL_HEADER = 'x-fieldbench-protocol';

const LOOPBACK_NAMES = new Set(['localhost', '127.0.0.1', '[::1]']);

/**
 * Whether `host` (the address the server listens on) is only reachable from this machine.
 * @param {string} host
 */
export function isLoopback(host) {
	return host === 'localhost' || host === '::1' || /^127\.\d+\.\d+\.\d+$/.test(host);
}

/**
 * The name in a Host header (`localhost:3000` → `localhost`, `[::1]:3000` → `[::1]`), or null.
 * @param {string | string[] | undefined} hostHeader
 */
export function hostName(hostHeader) {
	if (Array.isArray(hostHeader)) return null;
	if (!hostHeader) return null;
	try {
		return new URL(`http://${hostHeader}`).hostname.toLowerCase();
	} catch {
		return null;
	}
}

/**
 * How requests are prepared, from the server's environment: `perRequest` when the origin is
 * derived from each request, and `loopbackOnly` when only loopback names are answered.
 * @param {Record<string, string | undefined>} env
 */
export function originMode(env) {
	const perRequest = !env.ORIGIN && !env.PROTOCOL_HEADER;
	return { perRequest, loopbackOnly: perRequest && isLoopback(env.HOST ?? '0.0.0.0') };
}

/**
 * Prepare one request before the app sees it. Returns null to go on, or the refusal to send.
 * @param {{ headers: Record<string, string | string[] | undefined> }} req
 * @param {{ perRequest: boolean, loopbackOnly: boolean }} mode
 */
export function prepareRequest(req, mode) {
	if (!mode.perRequest) return null;
	req.headers[PROTOCOL_HEADER] = 'http';
	if (mode.loopbackOnly && !LOOPBACK_NAMES.has(hostName(req.headers.host) ?? '')) {
		return {
			status: 421,
			body: {
				error: {
					code: 'unknown_host',
					message: 'This server answers only at localhost or 127.0.0.1.'
				}
			}
		};
	}
	return null;
}
