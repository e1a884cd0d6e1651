/**
 * The counts beside the lead's Clashes and Sign-offs entries: the open clashes of the lead's
 * own workshop, the same number the clash inbox (GET /api/conflicts) lists, and the finished
 * apprentice tests waiting for a sign-off; nothing is counted for a role that does not see
 * the entry.
 */
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { jobs } from '../../src/lib/server/services/jobs';
import { navFor } from '../../src/lib/nav';
import type { SessionUser } from '../../src/lib/server/auth/types';
import { countOpenClashes, navCounts } from '../../src/lib/server/nav';
import { countWaiting } from '../../src/lib/server/services/signoffs';
import { makeWorkshop, TEST_PASSWORD } from '../helpers/fixtures';
import { Client } from '../helpers/http';
import { create, op, push } from '../helpers/sync';

const base = inject('baseURL');
let ws: Awaited<ReturnType<typeof makeWorkshop>>;
let other: Awaited<ReturnType<typeof makeWorkshop>>;
let n = 0;

async function signedIn(email: string) {
	const c = new Client(base, `10.23.0.${++n}`);
	expect((await c.signIn(email, TEST_PASSWORD)).status).toBe(303);
	return c;
}
const sessionUser = (w: typeof ws, role: 'lead' | 'technician'): SessionUser => ({
	id: w.users[role].id,
	workshopId: w.workshop.id,
	workshopName: 'test',
	email: w.users[role].email,
	name: role,
	role
});

beforeAll(async () => {
	ws = await makeWorkshop('Nav');
	other = await makeWorkshop('Nav other');
});

describe('the clash count', () => {
	it('is nought for a workshop without clashes', async () => {
		expect(await countOpenClashes({ workshopId: ws.workshop.id })).toBe(0);
	});

	it('counts a clash made by two devices, as the inbox lists it, and only in its workshop', async () => {
		const lead = await signedIn(ws.users.lead.email);
		const tech = await signedIn(ws.users.technician.email);
		const job = await jobs.create(ws.users.lead.actor, {
			complaint: 'Cranks but will not start',
			assigneeId: ws.users.technician.id
		});
		const v = job.version as number;
		const id = job.id as string;
		expect((await push(tech, 'phone-a', [op('job', 'patch', id, { complaint: 'No start when cold' }, v)]))[0].status).toBe('applied');
		expect((await push(lead, 'tablet-b', [op('job', 'patch', id, { complaint: 'No start when hot' }, v)]))[0].status).toBe('conflict');

		const inbox = await (await lead.get('/api/conflicts')).json();
		expect(inbox.items).toHaveLength(1);
		expect(await countOpenClashes({ workshopId: ws.workshop.id })).toBe(1);
		expect(await countOpenClashes({ workshopId: other.workshop.id })).toBe(0);
	});

	it('is worked out for a lead who sees Clashes and not for a technician', async () => {
		const lead = sessionUser(ws, 'lead');
		expect(await navCounts(lead, navFor('lead', { 'lead-desk': true }))).toEqual({ clashes: 1, signoffs: 0 });
		expect(await navCounts(lead, navFor('lead', { 'lead-desk': false }))).toEqual({});
		expect(await navCounts(sessionUser(ws, 'technician'), navFor('technician', { 'lead-desk': true }))).toEqual({});
	});
});

describe('the sign-off count', () => {
	it('counts the apprentice’s finished tests until a lead signs them off, only in their workshop', async () => {
		const apprentice = await signedIn(ws.users.apprentice.email);
		const job = await jobs.create(ws.users.lead.actor, { complaint: 'Flat battery', assigneeId: ws.users.apprentice.id });
		const done = create('test', { jobId: job.id, partNumber: 'NC-1', position: '1', state: 'done' });
		const started = create('test', { jobId: job.id, partNumber: 'NC-1', position: '2' }); // not finished: not yet waiting
		expect((await push(apprentice, 'app-phone', [done, started])).map((r) => r.status)).toEqual(['applied', 'applied']);
		expect(await countWaiting({ workshopId: ws.workshop.id })).toBe(1);
		expect(await countWaiting({ workshopId: other.workshop.id })).toBe(0);
		expect(await navCounts(sessionUser(ws, 'lead'), navFor('lead', { 'lead-desk': true }))).toMatchObject({ signoffs: 1 });
		const lead = await signedIn(ws.users.lead.email);
		expect((await push(lead, 'lead-phone', [create('signoff', { testId: done.entityId, mode: 'witnessed' })]))[0].status).toBe('applied');
		expect(await countWaiting({ workshopId: ws.workshop.id })).toBe(0);
	});
});
