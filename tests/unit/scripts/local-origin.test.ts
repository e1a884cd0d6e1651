import { describe, expect, it } from 'vitest';
import {
	PROTOCOL_HEADER,
	hostName,
	isLoopback,
	originMode,
	prepareRequest
} from '../../../scripts/lib/local-origin.js';

const request = (headers: Record<string, string>) => ({
	headers: { ...headers } as Record<string, string>
});

describe('the origin of a request on this machine', () => {
	it('derives the origin per request only when neither ORIGIN nor PROTOCOL_HEADER is set', () => {
		expect(originMode({ HOST: '127.0.0.1' })).toEqual({ perRequest: true, loopbackOnly: true });
		expect(originMode({ HOST: '0.0.0.0' })).toEqual({ perRequest: true, loopbackOnly: false });
		expect(originMode({})).toEqual({ perRequest: true, loopbackOnly: false });
		expect(originMode({ HOST: '127.0.0.1', ORIGIN: 'https://bench.example' }).perRequest).toBe(
			false
		);
		expect(originMode({ HOST: '127.0.0.1', PROTOCOL_HEADER: 'x-forwarded-proto' }).perRequest).toBe(
			false
		);
	});

	it('knows the loopback listening addresses', () => {
		for (const h of ['127.0.0.1', '127.0.1.1', 'localhost', '::1'])
			expect(isLoopback(h)).toBe(true);
		for (const h of ['0.0.0.0', '::', '192.168.1.20', '128.0.0.1'])
			expect(isLoopback(h)).toBe(false);
	});

	it('reads the name from a Host header', () => {
		expect(hostName('localhost:3000')).toBe('localhost');
		expect(hostName('LOCALHOST:3000')).toBe('localhost');
		expect(hostName('127.0.0.1')).toBe('127.0.0.1');
		expect(hostName('[::1]:3001')).toBe('[::1]');
		expect(hostName(undefined)).toBeNull();
		expect(hostName('bad host')).toBeNull();
	});

	it('marks every request as plain http, over whatever the client sent', () => {
		const req = request({ host: 'localhost:3000', [PROTOCOL_HEADER]: 'https' });
		expect(prepareRequest(req, { perRequest: true, loopbackOnly: true })).toBeNull();
		expect(req.headers[PROTOCOL_HEADER]).toBe('http');
	});

	it('answers only loopback names when bound to loopback', () => {
		const mode = { perRequest: true, loopbackOnly: true };
		for (const host of ['localhost:3000', '127.0.0.1:3001', '[::1]:3000', 'localhost']) {
			expect(prepareRequest(request({ host }), mode)).toBeNull();
		}
		for (const host of ['evil.example:3000', 'localhost.evil.example', '10.0.0.2:3000', '']) {
			expect(prepareRequest(request({ host }), mode)?.status).toBe(421);
		}
	});

	it('leaves requests alone when ORIGIN is set', () => {
		const req = request({ host: 'bench.example' });
		expect(prepareRequest(req, { perRequest: false, loopbackOnly: false })).toBeNull();
		expect(req.headers[PROTOCOL_HEADER]).toBeUndefined();
	});
});
