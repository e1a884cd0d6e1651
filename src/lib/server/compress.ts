/**
 * An answer's bytes compressed in one go, for the large JSON answers the app writes whole
 * (the sync pull). The app process compresses everything else as a stream (`compression` in
 * `scripts/lib/app-process.js`); fed a multi-megabyte body, that stream costs ten times what
 * one call to zlib does (`npm run bench:pull`), so these answers arrive already encoded and
 * the stream leaves them alone. Same choices as the stream: brotli when the client takes it,
 * else gzip, each at its fastest setting, and nothing under 1 KiB.
 */
import { promisify } from 'node:util';
import zlib from 'node:zlib';
import Negotiator from 'negotiator';

const brotli = promisify(zlib.brotliCompress);
const gzip = promisify(zlib.gzip);

/** Below this an answer goes as it is (as the stream's threshold). */
export const COMPRESS_FROM = 1024;

/** `body` encoded as the request's `Accept-Encoding` prefers: the bytes and the `Content-Encoding` (none: as it is). */
export async function compressFor(acceptEncoding: string | null, body: Uint8Array): Promise<{ body: Uint8Array; encoding?: 'br' | 'gzip' }> {
	if (body.length < COMPRESS_FROM || !acceptEncoding) return { body };
	// Either is welcome when the client takes it at all; brotli first (smaller, and as fast here).
	const ok = new Negotiator({ headers: { 'accept-encoding': acceptEncoding } }).encodings(['br', 'gzip']);
	if (ok.includes('br'))
		return {
			body: await brotli(body, { params: { [zlib.constants.BROTLI_PARAM_QUALITY]: 1, [zlib.constants.BROTLI_PARAM_SIZE_HINT]: body.length } }),
			encoding: 'br'
		};
	if (ok.includes('gzip')) return { body: await gzip(body, { level: zlib.constants.Z_BEST_SPEED }), encoding: 'gzip' };
	return { body };
}
