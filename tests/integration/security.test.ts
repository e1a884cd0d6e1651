/**
 * Sessions, cookies, cross-site requests and response headers, each test named after the
 * OWASP Application Security Verification Standard 5.0 requirement it checks (ASVS 5.0,
 * chapter V7 Session Management and chapter V3 Web Frontend Security).
 */
import { QueryTypes } from 'sequelize';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { SESSION_IDLE_DAYS, SESSION_MAX_DAYS } from '../../src/lib/server/auth/lucia';
import { db } from '../../src/lib/server/db';
import { makeWorkshop, TEST_PASSWORD } from '../helpers/fixtures';
import { Client } from '../helpers/http';

const base = inject('baseURL');
let ws: Awaited<ReturnType<typeof makeWorkshop>>;
let n = 0;
const client = () => new Client(base, `10.13.0.${++n}`);
const DAY = 86_400_000;

async function signedIn(email: string) {
	const c = client();
	expect((await c.signIn(email, TEST_PASSWORD)).status).toBe(303);
	return c;
}
const sessionOf = (c: Client) => c.cookies.get('fb_session')!;
const replay = (sessionId: string) => {
	const c = client();
	c.cookies.set('fb_session', sessionId);
	return c;
};
const row = async (id: string) =>
	(await db().query<{ created_at: Date; expires_at: Date }>('SELECT created_at, expires_at FROM sessions WHERE id = ?', { replacements: [id], type: QueryTypes.SELECT }))[0];
const setTimes = (id: string, createdAt: Date, expiresAt: Date) =>
	db().query('UPDATE sessions SET created_at = ?, expires_at = ? WHERE id = ?', { replacements: [createdAt, expiresAt, id], type: QueryTypes.UPDATE });

beforeAll(async () => {
	ws = await makeWorkshop('Security');
});

describe('sessions (ASVS 5.0 V7)', () => {
	it('7.2.4: every sign-in makes a new session id and ends the one the browser had', async () => {
		const c = await signedIn(ws.users.technician.email);
		const first = sessionOf(c);
		expect((await c.signIn(ws.users.technician.email, TEST_PASSWORD)).status).toBe(303);
		const second = sessionOf(c);
		expect(second).not.toBe(first);
		expect((await replay(first).get('/api/me')).status).toBe(401);
		expect((await c.get('/api/me')).status).toBe(200);
	});

	it('7.2.4: a session id planted before sign-in is never adopted', async () => {
		const c = client();
		c.cookies.set('fb_session', 'planted-by-someone-else-0000000000');
		expect((await c.signIn(ws.users.technician.email, TEST_PASSWORD)).status).toBe(303);
		expect(sessionOf(c)).not.toBe('planted-by-someone-else-0000000000');
		expect((await replay('planted-by-someone-else-0000000000').get('/api/me')).status).toBe(401);
	});

	it('7.2.3: session ids are random reference tokens of at least 128 bits', async () => {
		const ids = new Set<string>();
		for (let i = 0; i < 3; i++) ids.add(sessionOf(await signedIn(ws.users.apprentice.email)));
		expect(ids.size).toBe(3);
		// lucia's ids: base32 (5 bits a character) of random bytes.
		for (const id of ids) expect(id.length * 5).toBeGreaterThanOrEqual(128);
	});

	it('7.4.1: sign-out ends every session of the user, on every device, and the back button shows sign-in', async () => {
		const phone = await signedIn(ws.users.lead.email);
		const desk = await signedIn(ws.users.lead.email);
		const other = await signedIn(ws.users.owner.email);
		expect((await phone.form('/sign-out', {})).status).toBe(303);
		expect((await phone.get('/api/me')).status).toBe(401);
		expect((await desk.get('/api/me')).status).toBe(401);
		const back = await desk.get('/jobs', 'text/html');
		expect([back.status, back.headers.get('location')]).toEqual([303, '/sign-in?next=%2Fjobs']);
		expect((await other.get('/api/me')).status).toBe(200); // another user's session is untouched
	});

	it('7.4.3, 7.5.1, 6.2.3: a password change asks for the current password and ends every session; this browser gets a new one', async () => {
		const { users } = await makeWorkshop('Password');
		const email = users.technician.email;
		const phone = await signedIn(email);
		const desk = await signedIn(email);
		const before = sessionOf(desk);
		const wrong = await desk.form('/password', { current: 'not-my-password', next: 'a-new-password-42', repeat: 'a-new-password-42' });
		expect(wrong.status).toBe(400);
		const differ = await desk.form('/password', { current: TEST_PASSWORD, next: 'a-new-password-42', repeat: 'a-new-password-43' });
		expect(differ.status).toBe(400);
		const short = await desk.form('/password', { current: TEST_PASSWORD, next: 'short', repeat: 'short' });
		expect(short.status).toBe(400);
		expect((await phone.get('/api/me')).status).toBe(200); // nothing changed yet

		const ok = await desk.form('/password', { current: TEST_PASSWORD, next: 'a-new-password-42', repeat: 'a-new-password-42' });
		expect([ok.status, ok.headers.get('location')]).toEqual([303, '/password?changed']);
		expect(sessionOf(desk)).not.toBe(before);
		expect((await desk.get('/api/me')).status).toBe(200);
		expect((await phone.get('/api/me')).status).toBe(401);
		expect((await replay(before).get('/api/me')).status).toBe(401);
		expect((await client().signIn(email, TEST_PASSWORD)).status).toBe(400);
		expect((await client().signIn(email, 'a-new-password-42')).status).toBe(303);
		const [audit] = await db().query<{ n: number }>("SELECT COUNT(*) AS n FROM audit_log WHERE entity_id = ? AND action = 'password_change'", { replacements: [users.technician.id], type: QueryTypes.SELECT });
		expect(Number(audit.n)).toBe(1);
	});

	it('7.4.3: wrong current passwords count against the sign-in throttle', async () => {
		const { users } = await makeWorkshop('Throttle');
		const c = await signedIn(users.lead.email);
		const statuses: number[] = [];
		for (let i = 0; i < 6; i++) statuses.push((await c.form('/password', { current: `guess-${i}`, next: 'a-new-password-42', repeat: 'a-new-password-42' })).status);
		expect(statuses).toEqual([400, 400, 400, 400, 400, 429]);
	});

	it(`7.3.1: a session unused past its renewal plus ${SESSION_IDLE_DAYS} days has ended; one used in its second half is renewed`, async () => {
		const idle = await signedIn(ws.users.technician.email);
		const id = sessionOf(idle);
		await setTimes(id, new Date(Date.now() - 8 * DAY), new Date(Date.now() - 1000));
		const r = await idle.get('/api/me');
		expect(r.status).toBe(401);
		expect(r.headers.getSetCookie().join()).toMatch(/fb_session=;/);
		expect(await row(id)).toBeUndefined();

		const used = await signedIn(ws.users.technician.email);
		const usedId = sessionOf(used);
		await setTimes(usedId, new Date(Date.now() - 5 * DAY), new Date(Date.now() + 2 * DAY));
		expect((await used.get('/api/me')).status).toBe(200);
		const renewed = new Date((await row(usedId)).expires_at).getTime();
		expect(Math.abs(renewed - (Date.now() + SESSION_IDLE_DAYS * DAY))).toBeLessThan(60_000);
	});

	it(`7.3.2: a session ends ${SESSION_MAX_DAYS} days after sign-in however much it is used, and is never renewed past that`, async () => {
		const c = await signedIn(ws.users.technician.email);
		const id = sessionOf(c);
		// Signed in 29 days ago and used in the second half of its time: renewed only to day 30.
		const signedInAt = new Date(Date.now() - 29 * DAY);
		await setTimes(id, signedInAt, new Date(Date.now() + DAY));
		expect((await c.get('/api/me')).status).toBe(200);
		const capped = new Date((await row(id)).expires_at).getTime();
		expect(Math.abs(capped - (signedInAt.getTime() + SESSION_MAX_DAYS * DAY))).toBeLessThan(1000);
		// Signed in 31 days ago, its stored expiry still ahead: ended all the same.
		await setTimes(id, new Date(Date.now() - 31 * DAY), new Date(Date.now() + 5 * DAY));
		expect((await c.get('/api/me')).status).toBe(401);
		expect(await row(id)).toBeUndefined();
	});
});

describe('cookies (ASVS 5.0 V3.3)', () => {
	it('3.3.2, 3.3.4: the session cookie is HttpOnly, SameSite=Lax, host-only, path / and has an expiry', async () => {
		const r = await client().signIn(ws.users.technician.email, TEST_PASSWORD);
		const cookie = r.headers.getSetCookie().find((c) => c.startsWith('fb_session='))!;
		expect(cookie).toMatch(/;\s*HttpOnly/i);
		expect(cookie).toMatch(/;\s*SameSite=Lax/i);
		expect(cookie).toMatch(/;\s*Path=\/(;|$)/i);
		expect(cookie).toMatch(/;\s*Expires=/i);
		expect(cookie).not.toMatch(/Domain=/i);
		expect(cookie.length).toBeLessThan(4096); // 3.3.5
	});
});

describe('cross-site requests (ASVS 5.0 V3.5)', () => {
	const foreign = 'https://elsewhere.example';
	it('3.5.1: a form post from another site is refused, sign-in included', async () => {
		const r = await fetch(`${base}/sign-in`, { method: 'POST', headers: { origin: foreign, 'content-type': 'application/x-www-form-urlencoded' }, body: `email=${ws.users.technician.email}&password=${TEST_PASSWORD}`, redirect: 'manual' });
		expect(r.status).toBe(403);
		expect(r.headers.getSetCookie()).toEqual([]);
	});

	it('3.5.1, 3.5.2: a JSON post from another site is refused with the error body, even with the session cookie', async () => {
		const lead = await signedIn(ws.users.lead.email);
		for (const type of ['application/json', 'text/plain']) {
			const r = await fetch(`${base}/api/jobs`, { method: 'POST', headers: { ...lead.headers({ 'content-type': type }), origin: foreign }, body: JSON.stringify({ complaint: 'Forged' }) });
			expect(r.status).toBe(403);
			expect((await r.json()).error.code).toBe('cross_site');
		}
		const control = await lead.json('POST', '/api/jobs', { complaint: 'Made on our own page' });
		expect(control.status).toBe(201);
	});

	it('3.5.2: without an Origin, a cross-site fetch (Sec-Fetch-Site) and a form-typed body are refused; plain JSON from a non-browser client passes', async () => {
		const lead = await signedIn(ws.users.lead.email);
		const { origin: _o, ...noOrigin } = lead.headers({ 'content-type': 'application/json' });
		const crossSite = await fetch(`${base}/api/jobs`, { method: 'POST', headers: { ...noOrigin, 'sec-fetch-site': 'cross-site' }, body: '{"complaint":"Forged"}' });
		expect(crossSite.status).toBe(403);
		const formTyped = await fetch(`${base}/api/sync/push`, { method: 'POST', headers: { ...noOrigin, 'content-type': 'text/plain' }, body: '{}' });
		expect(formTyped.status).toBe(403);
		const script = await fetch(`${base}/api/jobs`, { method: 'POST', headers: noOrigin, body: '{"complaint":"From a script"}' });
		expect(script.status).toBe(201);
	});
});

describe('response headers (ASVS 5.0 V3.4)', () => {
	const policy = (r: Response) =>
		new Map(
			(r.headers.get('content-security-policy') ?? '')
				.split(';')
				.map((d) => d.trim().split(/\s+/))
				.filter((d) => d[0])
				.map(([name, ...values]) => [name, values])
		);

	it('3.4.3, 3.4.6: a rendered page has a policy with a fresh nonce, no plugins, no <base>, and no framing', async () => {
		const one = await fetch(`${base}/sign-in`);
		const two = await fetch(`${base}/sign-in`);
		const p = policy(one);
		expect(p.get('object-src')).toEqual(["'none'"]);
		expect(p.get('base-uri')).toEqual(["'none'"]);
		expect(p.get('frame-ancestors')).toEqual(["'none'"]);
		expect(p.get('default-src')).toEqual(["'self'"]);
		const nonce = p.get('script-src')?.find((s) => s.startsWith("'nonce-"));
		expect(nonce).toBeDefined();
		expect(p.get('script-src')).not.toContain("'unsafe-inline'");
		expect(policy(two).get('script-src')).not.toContain(nonce);
		expect(await one.text()).toContain(`nonce="${nonce!.slice(7, -1)}"`);
	});

	it('3.4.3, 3.4.4, 3.4.5, 3.4.6: every other answer — JSON, redirects, files, the service worker and the shell — carries the headers', async () => {
		const page = await (await fetch(`${base}/sign-in`)).text();
		const script = page.match(/\/_app\/immutable\/[^"']+\.js/)![0];
		const sw = await fetch(`${base}/sw.js`);
		const styles = await Promise.all([...page.matchAll(/\/_app\/immutable\/[^"']+\.css/g)].map(async ([href]) => (await fetch(base + href)).text()));
		const font = styles.join('\n').match(/\/_app\/immutable\/assets\/[^)"']+\.woff2/)![0];
		const answers = {
			json: await fetch(`${base}/api/me`),
			redirect: await fetch(`${base}/jobs`, { redirect: 'manual' }),
			script: await fetch(base + script),
			font: await fetch(base + font),
			serviceWorker: sw,
			shell: await fetch(`${base}/shell`)
		};
		for (const [what, r] of Object.entries(answers)) {
			expect([what, r.headers.get('x-content-type-options')]).toEqual([what, 'nosniff']);
			expect([what, r.headers.get('referrer-policy')]).toEqual([what, 'same-origin']);
			expect([what, policy(r).get('frame-ancestors')]).toEqual([what, ["'none'"]]);
			expect([what, policy(r).get('object-src')]).toEqual([what, ["'none'"]]);
			expect([what, policy(r).get('base-uri')]).toEqual([what, ["'none'"]]);
		}
		expect(policy(answers.json).get('default-src')).toEqual(["'none'"]);
		// The prerendered shell names its own script hashes in a <meta> policy.
		expect(await answers.shell.text()).toMatch(/<meta http-equiv="content-security-policy" content="[^"]*script-src 'self' 'sha256-/i);
	});
});
