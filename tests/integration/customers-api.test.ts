/** The customers JSON API against the built app and MariaDB. */
import { beforeAll, describe, expect, it } from 'vitest';
import { AuditEntry, Customer, Job } from '../../src/lib/server/db/models';
import * as customers from '../../src/lib/server/services/customers';
import { jobs } from '../../src/lib/server/services/jobs';
import { vehicles } from '../../src/lib/server/services/vehicles';
import type { Client } from '../helpers/http';
import {
	expectError,
	expectInvalid,
	expectStaleRefused,
	postCreated,
	tag,
	twoWorkshops,
	type Role,
	type Workshop
} from '../helpers/records';

let a: Workshop;
let b: Workshop;
let as: Record<Role, Client>;
let customerOfB: string;

beforeAll(async () => {
	({ a, b, as } = await twoWorkshops('Customers'));
	customerOfB = (await customers.create(b.users.lead.actor, { name: 'Only in B' })).id as string;
});

async function add(c: Client, body: Record<string, unknown>) {
	const { customer } = await postCreated(c, '/api/customers', body);
	return customer as Record<string, unknown> & { id: string; version: number };
}

describe('POST /api/customers', () => {
	it('adds a customer at version 1 with one audit row per field', async () => {
		const c = await add(as.technician, {
			name: ' Marit Oldcastle ',
			phone: '0100 555 0142',
			email: 'marit@example.org',
			reportConsent: true
		});
		expect(c).toMatchObject({ name: 'Marit Oldcastle', reportConsent: true, version: 1 });
		const audit = await AuditEntry.findAll({ where: { entityId: c.id } });
		expect(audit.map((r) => r.field).sort()).toEqual(['email', 'name', 'phone', 'reportConsent']);
		expect(audit.every((r) => r.userId === a.users.technician.id)).toBe(true);
	});

	it('answers 400 for a malformed body', async () => {
		await expectError(await as.technician.json('POST', '/api/customers', '{name:'), 400, 'invalid');
	});

	it('answers 400 naming each invalid field, and writes nothing', async () => {
		const before = await Customer.count({ where: { workshopId: a.workshop.id } });
		const e = await expectInvalid(
			await as.technician.json('POST', '/api/customers', { name: '', email: 'not-an-address' }),
			'email'
		);
		expect(e.fields).toHaveProperty('name');
		expect(await Customer.count({ where: { workshopId: a.workshop.id } })).toBe(before);
	});

	it('refuses an apprentice adding a customer without one of their jobs (403)', async () => {
		await expectError(
			await as.apprentice.json('POST', '/api/customers', { name: 'Loose customer' }),
			403,
			'forbidden'
		);
		const other = await jobs.create(a.users.lead.actor, {
			complaint: 'Technician’s job',
			assigneeId: a.users.technician.id
		});
		await expectError(
			await as.apprentice.json('POST', '/api/customers', { name: 'X', jobId: other.id }),
			403,
			'forbidden'
		);
	});

	it('lets an apprentice add the customer of their own job, linked in the same write', async () => {
		const own = await jobs.create(a.users.lead.actor, {
			complaint: 'Apprentice’s job',
			assigneeId: a.users.apprentice.id
		});
		const c = await add(as.apprentice, { name: 'Customer for Jory', jobId: own.id });
		const job = await Job.findByPk(own.id as string);
		expect(job!.customerId).toBe(c.id);
		expect(job!.version).toBe(2);
	});

	it('answers 400 naming jobId for another workshop’s job', async () => {
		const theirs = await jobs.create(b.users.lead.actor, { complaint: 'B' });
		await expectInvalid(
			await as.lead.json('POST', '/api/customers', { name: 'X', jobId: theirs.id }),
			'jobId'
		);
	});
});

describe('GET /api/customers', () => {
	let t: string;
	beforeAll(async () => {
		t = tag('cust');
		const lead = a.users.lead.actor;
		await customers.create(lead, {
			name: `${t} Avery`,
			phone: '0100 555 0190',
			reportConsent: true
		});
		await customers.create(lead, { name: `${t} Bryn`, email: `bryn.${t}@example.org` });
		await customers.create(lead, { name: `${t} Cass`, reportConsent: true });
	});
	const names = async (qs: string) => {
		const r = await as.technician.get(`/api/customers?${qs}`);
		expect(r.status).toBe(200);
		const body = await r.json();
		return { ...body, names: body.items.map((c: { name: string }) => c.name.replace(`${t} `, '')) };
	};

	it('searches, filters, sorts and pages on the server', async () => {
		expect((await names(`q=${t}`)).names).toEqual(['Avery', 'Bryn', 'Cass']);
		expect((await names(`q=${t}&sort=-name`)).names).toEqual(['Cass', 'Bryn', 'Avery']);
		expect((await names(`q=${t}&consent=yes`)).names).toEqual(['Avery', 'Cass']);
		const page2 = await names(`q=${t}&pageSize=2&page=2`);
		expect(page2).toMatchObject({ total: 3, page: 2, pageSize: 2, names: ['Cass'] });
	});

	it('finds a customer by phone whatever the spaces, and by e-mail', async () => {
		expect((await names('q=01005550190')).names).toContain('Avery');
		expect((await names(`q=bryn.${t}`)).names).toEqual(['Bryn']);
	});

	it('counts each customer’s vehicles', async () => {
		const c = await customers.create(a.users.lead.actor, { name: `${t} Dale` });
		await vehicles.create(a.users.lead.actor, {
			make: 'Corvane',
			model: 'Pica',
			chassisNo: 'CP-0042',
			chassisReason: 'Built before 1981',
			customerId: c.id
		});
		const body = await (await as.lead.get(`/api/customers?q=${t} Dale`)).json();
		expect(body.items[0].vehicleCount).toBe(1);
	});

	it('answers 400 naming a parameter it cannot read', async () => {
		await expectInvalid(await as.lead.get('/api/customers?sort=age'), 'sort');
		await expectInvalid(await as.lead.get('/api/customers?consent=maybe'), 'consent');
		await expectInvalid(await as.lead.get('/api/customers?page=0'), 'page');
	});

	it('never lists another workshop’s customers', async () => {
		const body = await (await as.lead.get('/api/customers?q=Only in B')).json();
		expect(body.total).toBe(0);
	});
});

describe('GET /api/customers/:id', () => {
	it('answers the customer', async () => {
		const c = await add(as.lead, { name: 'Readable' });
		const r = await as.apprentice.get(`/api/customers/${c.id}`);
		expect(r.status).toBe(200);
		expect((await r.json()).customer).toMatchObject({ id: c.id, name: 'Readable' });
	});

	it('answers 404 for another workshop’s customer', async () => {
		await expectError(await as.lead.get(`/api/customers/${customerOfB}`), 404, 'not_found');
	});
});

describe('PATCH /api/customers/:id', () => {
	it('changes only the fields sent (consent is kept) and bumps the version', async () => {
		const c = await add(as.lead, { name: 'Consenting', reportConsent: true });
		const r = await as.technician.json('PATCH', `/api/customers/${c.id}`, {
			baseVersion: 1,
			phone: '0100 555 0177'
		});
		expect(r.status).toBe(200);
		expect((await r.json()).customer).toMatchObject({
			version: 2,
			phone: '0100 555 0177',
			reportConsent: true
		});
		const rows = await AuditEntry.findAll({ where: { entityId: c.id, action: 'update' } });
		expect(rows.map((x) => [x.field, x.userId])).toEqual([['phone', a.users.technician.id]]);
	});

	it('answers 400 for a malformed body and naming an invalid field', async () => {
		const c = await add(as.lead, { name: 'Patchable' });
		await expectError(await as.lead.json('PATCH', `/api/customers/${c.id}`, '[1,'), 400, 'invalid');
		await expectInvalid(
			await as.lead.json('PATCH', `/api/customers/${c.id}`, { baseVersion: 1, phone: 'ring me' }),
			'phone'
		);
	});

	it('lets an apprentice change only the customers of their own jobs (403 otherwise)', async () => {
		const c = await add(as.lead, { name: 'Not on Jory’s jobs' });
		await expectError(
			await as.apprentice.json('PATCH', `/api/customers/${c.id}`, { baseVersion: 1, name: 'x' }),
			403,
			'forbidden'
		);
		await jobs.create(a.users.lead.actor, {
			complaint: 'Now on it',
			customerId: c.id,
			assigneeId: a.users.apprentice.id
		});
		const r = await as.apprentice.json('PATCH', `/api/customers/${c.id}`, {
			baseVersion: 1,
			name: 'Now on Jory’s job'
		});
		expect(r.status).toBe(200);
	});

	it('answers 404 for another workshop’s customer', async () => {
		await expectError(
			await as.lead.json('PATCH', `/api/customers/${customerOfB}`, { baseVersion: 1, name: 'x' }),
			404,
			'not_found'
		);
		expect((await Customer.findByPk(customerOfB))!.name).toBe('Only in B');
	});

	it('answers 409 with the current record when the version is stale', async () => {
		const c = await add(as.lead, { name: 'Contested' });
		await expectStaleRefused(
			as,
			'customers',
			c.id,
			{ phone: '0100 555 0001' },
			{ phone: '0100 555 0002' }
		);
	});
});
