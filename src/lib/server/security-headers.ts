/**
 * Response headers every answer of the app carries (OWASP ASVS 5.0 §3.4). Pages get their
 * Content-Security-Policy from SvelteKit (`kit.csp` in svelte.config.js: a nonce per
 * rendered page, hashes in the prerendered shell); every other answer of the app (JSON, CSV,
 * redirects) gets `NON_PAGE_POLICY`, which lets a response opened as a document do nothing.
 * Files served before the app's hooks (the client build, the font, the service worker, the
 * shell) get the same headers from `scripts/serve.js` (`STATIC_HEADERS` there).
 */
import type { RequestEvent } from '@sveltejs/kit';

/** The policy of a response that is not a page: nothing may load, run or frame it. */
export const NON_PAGE_POLICY = "default-src 'none'; base-uri 'none'; object-src 'none'; form-action 'none'; frame-ancestors 'none'";

/** Headers for every response; `response` must be a fresh Response (its headers mutable). */
export function applySecurityHeaders(response: Response, event: Pick<RequestEvent, 'url'>): Response {
	const h = response.headers;
	if (!h.has('content-security-policy')) h.set('content-security-policy', NON_PAGE_POLICY);
	h.set('x-content-type-options', 'nosniff');
	h.set('referrer-policy', 'same-origin');
	h.set('x-frame-options', 'DENY'); // for browsers older than frame-ancestors
	h.set('permissions-policy', 'geolocation=(), microphone=(), payment=(), usb=()');
	h.set('cross-origin-opener-policy', 'same-origin');
	if (event.url.protocol === 'https:') h.set('strict-transport-security', 'max-age=31536000; includeSubDomains');
	return response;
}
