import { inject } from 'vitest';
import { beforeAll, describe, expect, it } from 'vitest';
import { Session, User } from '../../src/lib/server/db/models';
import * as customers from '../../src/lib/server/services/customers';
import { jobs } from '../../src/lib/server/services/jobs';
import { makeWorkshop, TEST_PASSWORD } from '../helpers/fixtures';
import { Client } from '../helpers/http';

const base = inject('baseURL');
let a: Awaited<ReturnType<typeof makeWorkshop>>;
let b: Awaited<ReturnType<typeof makeWorkshop>>;
let jobB: string;
let n = 0;
const client = () => new Client(base, `10.9.0.${++n}`);

beforeAll(async () => {
	a = await makeWorkshop('A');
	b = await makeWorkshop('B');
	const c = await customers.create(b.users.lead.actor, { name: 'Other workshop customer' });
	jobB = (
		await jobs.create(b.users.lead.actor, {
			customerId: c.id,
			complaint: 'Belongs to workshop B',
			assigneeId: b.users.technician.id
		})
	).id as string;
});

describe('signing in', () => {
	it('signs in with the right password and answers /api/me with the user and workshop', async () => {
		const c = client();
		const r = await c.signIn(a.users.technician.email, TEST_PASSWORD);
		expect(r.status).toBe(303);
		expect(r.headers.get('location')).toBe('/field');
		const cookie = r.headers.getSetCookie().find((x) => x.startsWith('fb_session='))!;
		expect(cookie).toMatch(/HttpOnly/i);
		expect(cookie).toMatch(/SameSite=Lax/i);
		expect(cookie).not.toMatch(/Secure/i); // plain http here; https requests get Secure
		const me = await (await c.get('/api/me')).json();
		expect(me.user).toMatchObject({
			id: a.users.technician.id,
			role: 'technician',
			workshopId: a.workshop.id
		});
	});

	it('gives a wrong password and an unknown e-mail the same answer', async () => {
		const wrong = await client().signIn(a.users.lead.email, 'not-the-password');
		const unknown = await client().signIn('nobody@test.example', 'not-the-password');
		expect(wrong.status).toBe(400);
		expect(unknown.status).toBe(400);
		const text = async (r: Response) =>
			(await r.text()).match(/role="alert"[^>]*>([\s\S]*?)<\/p>/)?.[1];
		const [t1, t2] = [await text(wrong), await text(unknown)];
		expect(t1).toContain('do not match');
		expect(t1).toBe(t2);
	});

	it('stores the password as argon2id with at least 19 MiB, 2 iterations, 1 lane (OWASP Password Storage Cheat Sheet)', async () => {
		const u = await User.findByPk(a.users.owner.id);
		const m = u!.passwordHash.match(/^\$argon2id\$v=19\$m=(\d+),t=(\d+),p=(\d+)\$/);
		expect(m).not.toBeNull();
		expect(Number(m![1])).toBeGreaterThanOrEqual(19456);
		expect(Number(m![2])).toBeGreaterThanOrEqual(2);
		expect(Number(m![3])).toBe(1);
	});

	it('keeps the session across requests and kills it at sign-out (the old cookie then gets 401)', async () => {
		const c = client();
		await c.signIn(a.users.apprentice.email, TEST_PASSWORD);
		const old = new Map(c.cookies);
		const sessionId = old.get('fb_session')!;
		expect((await c.get('/api/me')).status).toBe(200);
		expect((await c.get('/api/me')).status).toBe(200);
		const out = await c.form('/sign-out', {});
		expect(out.status).toBe(303);
		const replay = new Client(base);
		replay.cookies = old;
		expect((await replay.get('/api/me')).status).toBe(401);
		expect(await Session.count({ where: { id: sessionId } })).toBe(0);
	});

	it('issues a fresh session id at every sign-in', async () => {
		const c = client();
		await c.signIn(a.users.owner.email, TEST_PASSWORD);
		const first = c.cookies.get('fb_session');
		await c.signIn(a.users.owner.email, TEST_PASSWORD);
		expect(c.cookies.get('fb_session')).not.toBe(first);
	});

	it('answers the sixth quick failure for one account with 429 and a retry time', async () => {
		const w = await makeWorkshop('Throttle');
		const statuses: number[] = [];
		for (let i = 0; i < 6; i++)
			statuses.push((await client().signIn(w.users.lead.email, 'wrong-' + i)).status);
		expect(statuses).toEqual([400, 400, 400, 400, 400, 429]);
		const blocked = await client().signIn(w.users.lead.email, TEST_PASSWORD);
		expect(blocked.status).toBe(429);
		expect(await blocked.text()).toMatch(/Try again in \d+ (seconds|minutes)/);
	});

	it('throttles one address that tries many accounts', async () => {
		const c = client();
		const statuses: number[] = [];
		for (let i = 0; i < 21; i++)
			statuses.push((await c.signIn(`guess${i}@test.example`, 'x')).status);
		expect(statuses.slice(0, 20).every((s) => s === 400)).toBe(true);
		expect(statuses[20]).toBe(429);
	});
});

describe('guards', () => {
	it('answers 401 on every API route when signed out', async () => {
		const c = client();
		for (const path of ['/api/me', '/api/jobs', `/api/jobs/${jobB}`]) {
			const r = await c.get(path);
			expect(r.status, path).toBe(401);
			expect((await r.json()).error.code).toBe('signed_out');
		}
	});

	it('sends a signed-out visitor of a page to sign-in', async () => {
		const r = await client().get('/field', 'text/html');
		expect(r.status).toBe(303);
		expect(r.headers.get('location')).toBe('/sign-in?next=%2Ffield');
	});

	it('sends the old addresses of the phone screens on to /field', async () => {
		const c = client();
		for (const [from, to] of [
			['/home', '/field'],
			['/job/abc/test/new?x=1', '/field/job/abc/test/new?x=1'],
			['/sync', '/field/sync'],
			['/meters?back=/field', '/field/meters?back=/field']
		]) {
			const r = await c.get(from, 'text/html');
			expect(r.status, from).toBe(308);
			expect(r.headers.get('location'), from).toBe(to);
		}
	});

	it('gives a technician 403 on the lead page and on a lead-only action', async () => {
		const c = client();
		await c.signIn(a.users.technician.email, TEST_PASSWORD);
		expect((await c.get('/team', 'text/html')).status).toBe(403);
		const r = await c.form('/team?/invite', {
			name: 'Sneaky',
			email: 'sneaky@test.example',
			role: 'owner',
			password: 'long-enough-password'
		});
		expect(r.status).toBe(403);
		expect(await User.count({ where: { email: 'sneaky@test.example' } })).toBe(0);
	});

	it('lets a lead add a technician but not an owner', async () => {
		const c = client();
		await c.signIn(a.users.lead.email, TEST_PASSWORD);
		expect((await c.get('/team', 'text/html')).status).toBe(200);
		const email = `new-${Date.now()}@test.example`;
		const ok = await c.form('/team?/invite', {
			name: 'New Tech',
			email,
			role: 'technician',
			password: 'long-enough-password'
		});
		expect(ok.status).toBe(200);
		expect(
			await User.count({ where: { email, workshopId: a.workshop.id, role: 'technician' } })
		).toBe(1);
		const no = await c.form('/team?/invite', {
			name: 'X',
			email: 'x' + email,
			role: 'owner',
			password: 'long-enough-password'
		});
		expect(no.status).toBe(403);
	});

	it('gives a user of workshop A 404 for a job of workshop B, even as lead', async () => {
		const c = client();
		await c.signIn(a.users.lead.email, TEST_PASSWORD);
		const r = await c.get(`/api/jobs/${jobB}`);
		expect(r.status).toBe(404);
		expect((await r.json()).error.code).toBe('not_found');
		const list = await (await c.get('/api/jobs')).json();
		expect(list.items.map((j: { id: string }) => j.id)).not.toContain(jobB);
	});

	it('lists only assigned jobs for a technician and the whole workshop for a lead', async () => {
		const other = await jobs.create(b.users.lead.actor, {
			complaint: 'Unassigned',
			assigneeId: b.users.apprentice.id
		});
		const tech = client();
		await tech.signIn(b.users.technician.email, TEST_PASSWORD);
		const mine = (await (await tech.get('/api/jobs')).json()).items.map(
			(j: { id: string }) => j.id
		);
		expect(mine).toEqual([jobB]);
		expect((await tech.get(`/api/jobs/${other.id}`)).status).toBe(404);
		const lead = client();
		await lead.signIn(b.users.lead.email, TEST_PASSWORD);
		const all = (await (await lead.get('/api/jobs')).json()).items.map((j: { id: string }) => j.id);
		expect(all.sort()).toEqual([jobB, other.id].sort());
	});
});

describe('session lifetime', () => {
	const sessionOf = (c: Client) => Session.findByPk(c.cookies.get('fb_session')!);

	it('refuses an expired session and a deactivated user', async () => {
		const w = await makeWorkshop('Lifetime');
		const c = client();
		expect((await c.signIn(w.users.technician.email, TEST_PASSWORD)).status).toBe(303);
		expect((await c.get('/api/me')).status).toBe(200);
		await Session.update({ expiresAt: new Date(Date.now() - 60_000) }, { where: { id: c.cookies.get('fb_session')! } });
		expect((await c.get('/api/me')).status).toBe(401);

		const d = client();
		expect((await d.signIn(w.users.apprentice.email, TEST_PASSWORD)).status).toBe(303);
		await User.update({ active: false }, { where: { id: w.users.apprentice.id } });
		expect((await d.get('/api/me')).status).toBe(401);
	});

	it('slides a session used in the second half of its 7 idle days to a new expiry, and keeps a young one', async () => {
		const w = await makeWorkshop('Sliding');
		const c = client();
		expect((await c.signIn(w.users.technician.email, TEST_PASSWORD)).status).toBe(303);
		const young = (await sessionOf(c))!.expiresAt.getTime();
		expect((await c.get('/api/me')).status).toBe(200);
		expect((await sessionOf(c))!.expiresAt.getTime()).toBe(young);
		const twoDays = new Date(Date.now() + 2 * 86_400_000);
		await Session.update({ expiresAt: twoDays }, { where: { id: c.cookies.get('fb_session')! } });
		expect((await c.get('/api/me')).status).toBe(200);
		const slid = (await sessionOf(c))!.expiresAt.getTime();
		expect(slid).toBeGreaterThan(Date.now() + 6.9 * 86_400_000);
	});
});
