/**
 * The app answers at both loopback names and any port, with SvelteKit's cross-site check
 * still refusing form posts from every other origin (scripts/lib/local-origin.js).
 */
import http from 'node:http';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { makeWorkshop, TEST_PASSWORD } from '../helpers/fixtures';
import { Client } from '../helpers/http';

const base = inject('baseURL'); // http://localhost:PORT
const port = new URL(base).port;
const at = (name: string) => `http://${name}:${port}`;
let a: Awaited<ReturnType<typeof makeWorkshop>>;
let n = 0;
const address = () => `10.13.0.${++n}`;

beforeAll(async () => {
	a = await makeWorkshop('Origins');
});

/** A plain HTTP request with exactly these headers (fetch will not send a Host of our own). */
function raw(
	path: string,
	headers: Record<string, string>,
	body?: string
): Promise<{ status: number; text: string }> {
	return new Promise((resolve, reject) => {
		const req = http.request(
			{ host: '127.0.0.1', port, path, method: body === undefined ? 'GET' : 'POST', headers },
			(res) => {
				let text = '';
				res.on('data', (c) => (text += c));
				res.on('end', () => resolve({ status: res.statusCode!, text }));
			}
		);
		req.on('error', reject);
		req.end(body);
	});
}

const FORM = 'application/x-www-form-urlencoded';

describe('signing in at either loopback name', () => {
	for (const name of ['127.0.0.1', 'localhost']) {
		it(`signs in with a form posted from ${name} and keeps the session there`, async () => {
			const c = new Client(at(name), address());
			const r = await c.signIn(a.users.technician.email, TEST_PASSWORD);
			expect(r.status).toBe(303);
			expect(r.headers.get('location')).toBe('/field');
			const cookie = r.headers.getSetCookie().find((x) => x.startsWith('fb_session='));
			expect(cookie).toBeDefined();
			expect(cookie).not.toMatch(/Secure/i); // plain http
			const me = await c.get('/api/me');
			expect(me.status).toBe(200);
			expect((await me.json()).user.email).toBe(a.users.technician.email);
		});
	}

	it('takes a form posted from the other loopback name as cross-site (the names are two origins)', async () => {
		const c = new Client(at('127.0.0.1'), address());
		const r = await fetch(`${at('127.0.0.1')}/sign-in`, {
			method: 'POST',
			headers: {
				...c.headers({ 'content-type': FORM, accept: 'text/html' }),
				origin: at('localhost')
			},
			body: new URLSearchParams({ email: a.users.technician.email, password: TEST_PASSWORD }),
			redirect: 'manual'
		});
		expect(r.status).toBe(403);
		expect(r.headers.getSetCookie()).toEqual([]);
	});
});

describe('form posts from any other origin', () => {
	const body = new URLSearchParams({ email: 'x@example.test', password: 'x' }).toString();
	const refused = [
		'http://evil.example',
		`http://evil.example:${port}`,
		`https://localhost:${port}`,
		`http://localhost:${Number(port) + 1}`,
		'null'
	];
	for (const origin of refused) {
		it(`refuses a sign-in posted from ${origin} with 403`, async () => {
			const r = await raw(
				'/sign-in',
				{ host: `localhost:${port}`, origin, 'content-type': FORM, 'x-forwarded-for': address() },
				body
			);
			expect(r.status).toBe(403);
			expect(r.text).toContain('came from another site');
		});
	}

	it('refuses a form post without an Origin header', async () => {
		const r = await raw('/sign-in', { host: `localhost:${port}`, 'content-type': FORM }, body);
		expect(r.status).toBe(403);
	});

	it('does not let a request claim to have come over https', async () => {
		const r = await raw(
			'/sign-in',
			{
				host: `localhost:${port}`,
				origin: `https://localhost:${port}`,
				'x-fieldbench-protocol': 'https',
				'x-forwarded-proto': 'https',
				'content-type': FORM
			},
			body
		);
		expect(r.status).toBe(403);
	});
});

describe('the name the app answers to', () => {
	it('answers a loopback name at any port in the Host (a forwarded port, say)', async () => {
		const r = await raw('/api/health', { host: 'localhost:8080' });
		expect(r.status).toBe(200);
	});

	it("refuses a request for another site's name pointed at this machine, in the one error shape", async () => {
		const r = await raw('/api/health', { host: `evil.example:${port}` });
		expect(r.status).toBe(421);
		expect(JSON.parse(r.text)).toEqual({
			error: { code: 'unknown_host', message: expect.stringContaining('localhost') }
		});
	});
});
