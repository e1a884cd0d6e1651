/**
 * `compressFor`: the encoding chosen from `Accept-Encoding` as RFC 9110 §12.5.3 reads it
 * (a coding with q=0 is refused, `*` stands for any coding not named, `identity` alone means
 * none), and bytes that decompress with node's zlib (a general-purpose reference: RFC 7932
 * brotli, RFC 1952 gzip) to the very input.
 */
import zlib from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { COMPRESS_FROM, compressFor } from '../../../src/lib/server/compress';

const body = Buffer.from(JSON.stringify({ changes: Array.from({ length: 200 }, (_, i) => ({ seq: i, unit: 'Ω', value: i / 7 })) }));

describe('compressFor', () => {
	it('prefers brotli whenever the client takes it, whatever order it names them in', async () => {
		for (const header of ['gzip, deflate, br', 'br', 'br;q=0.1, gzip', '*']) {
			const out = await compressFor(header, body);
			expect(out.encoding, header).toBe('br');
			expect(zlib.brotliDecompressSync(out.body).equals(body)).toBe(true);
		}
	});

	it('falls back to gzip when brotli is refused or not named', async () => {
		for (const header of ['gzip', 'br;q=0, gzip', 'deflate, gzip;q=0.5', 'br;q=0, *']) {
			const out = await compressFor(header, body);
			expect(out.encoding, header).toBe('gzip');
			expect(zlib.gunzipSync(out.body).equals(body)).toBe(true);
		}
	});

	it('sends the bytes as they are when nothing it knows is taken, no header was sent, or the body is small', async () => {
		for (const header of [null, '', 'identity', 'deflate', 'br;q=0, gzip;q=0', '*;q=0'])
			expect((await compressFor(header, body)).encoding, String(header)).toBeUndefined();
		const small = body.subarray(0, COMPRESS_FROM - 1);
		const out = await compressFor('br, gzip', small);
		expect(out.encoding).toBeUndefined();
		expect(out.body).toBe(small);
		expect((await compressFor('br', body.subarray(0, COMPRESS_FROM))).encoding).toBe('br');
	});
});
