/**
 * The server-rendered job, customer and vehicle pages without JavaScript: plain form posts
 * go through the same services and checks as the API, and the answer keeps what was typed.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { Customer, Job } from '../../src/lib/server/db/models';
import { jobs } from '../../src/lib/server/services/jobs';
import { Client } from '../helpers/http';
import { makeWorkshop } from '../helpers/fixtures';
import { signInAll, tag, type Role, type Workshop } from '../helpers/records';
import { inject } from 'vitest';

let a: Workshop;
let b: Workshop;
let as: Record<Role, Client>;

beforeAll(async () => {
	a = await makeWorkshop('Pages A');
	b = await makeWorkshop('Pages B');
	as = await signInAll(a);
});

describe('office pages without JavaScript', () => {
	it('send a signed-out visitor to sign-in', async () => {
		const r = await new Client(inject('baseURL')).get('/jobs', 'text/html');
		expect(r.status).toBe(303);
		expect(r.headers.get('location')).toBe('/sign-in?next=%2Fjobs');
	});

	it('add a customer and redirect to its page', async () => {
		const name = tag('Form customer');
		const r = await as.technician.form('/customers/new', {
			name,
			phone: '0100 555 0120',
			email: ''
		});
		expect(r.status).toBe(303);
		const c = await Customer.findOne({ where: { name, workshopId: a.workshop.id } });
		expect(r.headers.get('location')).toBe(`/customers/${c!.id}`);
	});

	it('answer 400 with the field’s message and every value typed kept', async () => {
		const name = tag('Kept name');
		const r = await as.technician.form('/customers/new', {
			name,
			phone: '0100 555 0121',
			email: 'nope'
		});
		expect(r.status).toBe(400);
		const html = await r.text();
		expect(html).toContain('Enter an e-mail address like name@example.com');
		expect(html).toContain(`value="${name}"`);
		expect(html).toContain('value="0100 555 0121"');
		expect(await Customer.count({ where: { name } })).toBe(0);
	});

	it('refuse an apprentice adding a customer outside their jobs (403) in the action itself', async () => {
		const r = await as.apprentice.form('/customers/new', { name: 'Sneaky', jobId: '' });
		expect(r.status).toBe(403);
		expect(await r.text()).toContain('only for one of their own jobs');
		expect(await Customer.count({ where: { name: 'Sneaky', workshopId: a.workshop.id } })).toBe(0);
	});

	it('show a stale save as changed by someone else, with both values', async () => {
		const job = await jobs.create(a.users.lead.actor, {
			complaint: 'Clash on the page',
			assigneeId: a.users.technician.id
		});
		await jobs.update(a.users.lead.actor, job.id as string, 1, { location: 'Bay 1' });
		const r = await as.technician.form(`/jobs/${job.id}?/update`, {
			baseVersion: '1',
			complaint: 'Clash on the page',
			location: 'Driveway',
			notes: ''
		});
		expect(r.status).toBe(409);
		const html = await r.text();
		expect(html).toContain('Changed by someone else');
		expect(html).toContain('Bay 1');
		expect(html).toContain('value="Driveway"');
		expect((await Job.findByPk(job.id as string))!.location).toBe('Bay 1');
	});

	it('record a status change from the page, checked like the API', async () => {
		const job = await jobs.create(a.users.lead.actor, {
			complaint: 'Page status',
			assigneeId: a.users.apprentice.id
		});
		const closed = await as.apprentice.form(`/jobs/${job.id}?/status`, {
			baseVersion: '1',
			status: 'closed'
		});
		expect(closed.status).toBe(403);
		const ok = await as.apprentice.form(`/jobs/${job.id}?/status`, {
			baseVersion: '1',
			status: 'testing'
		});
		expect(ok.status).toBe(200);
		expect((await Job.findByPk(job.id as string))!.status).toBe('testing');
	});

	it('add and remove a fault code from the page', async () => {
		const job = await jobs.create(a.users.lead.actor, {
			complaint: 'Codes',
			assigneeId: a.users.technician.id
		});
		const bad = await as.technician.form(`/jobs/${job.id}?/addCode`, {
			list: 'after',
			code: 'P-1',
			text: ''
		});
		expect(bad.status).toBe(400);
		expect(await bad.text()).toContain('A code like P0301');
		await as.technician.form(`/jobs/${job.id}?/addCode`, {
			list: 'after',
			code: 'u0100',
			text: 'Lost communication'
		});
		expect((await Job.findByPk(job.id as string))!.codesAfter).toEqual([
			{ code: 'U0100', text: 'Lost communication' }
		]);
		await as.technician.form(`/jobs/${job.id}?/removeCode`, {
			list: 'after',
			index: '0',
			code: 'U0100'
		});
		expect((await Job.findByPk(job.id as string))!.codesAfter).toEqual([]);
	});

	it('answer 404 for another workshop’s job, customer and vehicle pages', async () => {
		const theirs = await jobs.create(b.users.lead.actor, { complaint: 'Not yours' });
		expect((await as.lead.get(`/jobs/${theirs.id}`, 'text/html')).status).toBe(404);
		const post = await as.lead.form(`/jobs/${theirs.id}?/update`, {
			baseVersion: '1',
			complaint: 'Taken over'
		});
		expect(post.status).toBe(404);
		expect((await Job.findByPk(theirs.id as string))!.complaint).toBe('Not yours');
		expect((await as.lead.get('/customers/not-an-id', 'text/html')).status).toBe(404);
	});
});
