/**
 * One app process: the built app's request handler (`build/handler.js`, adapter-node's
 * handler for a server of one's own) behind node's HTTP server on HOST:PORT, started by
 * `scripts/serve.js` once per process. Prints nothing: `npm start` prints the one address.
 *
 *  1. without ORIGIN, every request is given its own origin (`local-origin.js`), so the app
 *     works at 127.0.0.1, localhost and any port, and SvelteKit's cross-site check refuses
 *     every other origin;
 *  2. the handler serves the client files, the prerendered pages and the app;
 *  3. on SIGTERM/SIGINT, as adapter-node's own server does: stop taking connections, close
 *     idle ones (and each one as its request ends), close the rest after SHUTDOWN_TIMEOUT
 *     (30 s), then emit `sveltekit:shutdown` (the app closes its database pool on it).
 *
 * Answers of 1 KiB and more are compressed (`compression`: brotli when the client takes it,
 * else gzip; both at their fastest setting), except those that come already encoded: the
 * sync pull compresses its multi-megabyte pages itself in one call (`src/lib/server/compress.ts`),
 * which costs a tenth of this stream's work on them (docs/sync.md, bench:pull).
 *
 * adapter-node's handler settings (ORIGIN, ADDRESS_HEADER, BODY_SIZE_LIMIT, …) apply as
 * usual; the settings of its own server (SOCKET_PATH, socket activation, IDLE_TIMEOUT,
 * KEEP_ALIVE_TIMEOUT, HEADERS_TIMEOUT) do not, as that server is not used.
 */
import http from 'node:http';
import path from 'node:path';
import zlib from 'node:zlib';
import compression from 'compression';
import { pathToFileURL } from 'node:url';
import { PROTOCOL_HEADER, originMode, prepareRequest } from './local-origin.js';

const mode = originMode(process.env);
// adapter-node reads its environment when the handler is loaded.
if (mode.perRequest) process.env.PROTOCOL_HEADER = PROTOCOL_HEADER;
const build = path.resolve(import.meta.dirname, '..', '..', 'build');
const { handler } = await import(pathToFileURL(path.join(build, 'handler.js')).href);

const host = process.env.HOST ?? '0.0.0.0';
const port = Number(process.env.PORT ?? 3000);
const shutdownTimeout = (Number(process.env.SHUTDOWN_TIMEOUT) || 30) * 1000;

/**
 * Headers for the answers adapter-node gives before the app's hooks run (the client build, the
 * font, the service worker, the prerendered shell; OWASP ASVS 5.0 §3.4). The app sets its own
 * on everything else (src/lib/server/security-headers.ts), replacing these. The shell's
 * script and style rules come in its own <meta> policy (SvelteKit's hashes); a header cannot
 * add to them, so this one names only what a <meta> policy cannot say.
 */
const STATIC_HEADERS = {
	'content-security-policy': "object-src 'none'; base-uri 'none'; frame-ancestors 'none'",
	'x-content-type-options': 'nosniff',
	'referrer-policy': 'same-origin',
	'x-frame-options': 'DENY'
};

const compress = compression({
	level: zlib.constants.Z_BEST_SPEED,
	brotli: { params: { [zlib.constants.BROTLI_PARAM_QUALITY]: 1 } }
});

let stopping = false;

const server = http.createServer((req, res) => {
	req.on('close', () => {
		if (stopping) server.closeIdleConnections();
	});
	// Every answer starts with the static headers; the app's own replace them (see above).
	for (const [name, value] of Object.entries(STATIC_HEADERS)) res.setHeader(name, value);
	const refusal = prepareRequest(req, mode);
	if (refusal) {
		res.writeHead(refusal.status, { 'content-type': 'application/json' });
		res.end(JSON.stringify(refusal.body));
		return;
	}
	compress(/** @type {any} */ (req), /** @type {any} */ (res), () =>
		handler(req, res, () => {
			res.writeHead(404, { 'content-type': 'text/plain' });
			res.end('Not found');
		})
	);
});

server.listen(port, host);

/** @param {string} reason */
function stop(reason) {
	if (stopping) return;
	stopping = true;
	server.closeIdleConnections();
	const force = setTimeout(() => server.closeAllConnections(), shutdownTimeout);
	server.close(() => {
		clearTimeout(force);
		process.emit(/** @type {any} */ ('sveltekit:shutdown'), reason);
	});
}
process.on('SIGTERM', () => stop('SIGTERM'));
process.on('SIGINT', () => stop('SIGINT'));
