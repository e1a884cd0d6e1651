/** The jobs JSON API against the built app and MariaDB: list, read, create, update, status. */
import { beforeAll, describe, expect, it } from 'vitest';
import { AuditEntry, Job } from '../../src/lib/server/db/models';
import * as customers from '../../src/lib/server/services/customers';
import { jobs } from '../../src/lib/server/services/jobs';
import { vehicles } from '../../src/lib/server/services/vehicles';
import type { Client } from '../helpers/http';
import { create, push } from '../helpers/sync';
import {
	expectError,
	expectInvalid,
	expectStaleRefused,
	postCreated,
	signInAll,
	tag,
	twoWorkshops,
	type Role,
	type Workshop
} from '../helpers/records';

let a: Workshop;
let b: Workshop;
let as: Record<Role, Client>;
let bs: Record<Role, Client>;
let jobOfB: string;

beforeAll(async () => {
	({ a, b, as } = await twoWorkshops('Jobs'));
	bs = await signInAll(b);
	jobOfB = (await jobs.create(b.users.lead.actor, { complaint: 'Workshop B only' })).id as string;
});

async function newJob(c: Client, body: Record<string, unknown>) {
	const { job } = await postCreated(c, '/api/jobs', body);
	return job as Record<string, unknown> & { id: string; version: number };
}

describe('POST /api/jobs', () => {
	it('opens a job numbered by the server and assigned to the technician who opened it', async () => {
		const job = await newJob(as.technician, { complaint: 'No start when hot', number: 7 });
		expect(job.assigneeId).toBe(a.users.technician.id);
		expect(job.number).toBeGreaterThan(1000); // the sent number is ignored
		expect(job.status).toBe('open');
		expect(job.version).toBe(1);
		const audit = await AuditEntry.findAll({ where: { entityId: job.id, action: 'create' } });
		expect(audit.map((r) => r.field)).toEqual(expect.arrayContaining(['complaint', 'status']));
		expect(audit.every((r) => r.userId === a.users.technician.id)).toBe(true);
	});

	it('gives consecutive numbers within a workshop', async () => {
		const one = await newJob(as.lead, { complaint: 'First of two' });
		const two = await newJob(as.lead, { complaint: 'Second of two' });
		expect(two.number).toBe((one.number as number) + 1);
	});

	it('takes the vehicle’s owner as the customer when none is given', async () => {
		const owner = await customers.create(a.users.lead.actor, { name: 'Owner Of Car' });
		const car = await vehicles.create(a.users.lead.actor, {
			make: 'Corvane',
			model: 'Brisel',
			vin: '1M8GDM9AXKP042788',
			customerId: owner.id
		});
		const job = await newJob(as.technician, { complaint: 'Misfire', vehicleId: car.id });
		expect(job.customerId).toBe(owner.id);
	});

	it('answers 400 for a malformed body', async () => {
		const r = await as.technician.json('POST', '/api/jobs', '{"complaint": ');
		await expectError(r, 400, 'invalid');
	});

	it('answers 400 naming an invalid field, and writes nothing', async () => {
		const before = await Job.count({ where: { workshopId: a.workshop.id } });
		const e = await expectInvalid(
			await as.technician.json('POST', '/api/jobs', {
				complaint: ' ',
				codesBefore: [{ code: 'P03-01', text: 'bad code' }]
			}),
			'complaint'
		);
		expect(e.fields).toHaveProperty(['codesBefore.0.code']);
		expect(await Job.count({ where: { workshopId: a.workshop.id } })).toBe(before);
	});

	it('answers 400 naming a customer of another workshop', async () => {
		const theirs = await customers.create(b.users.lead.actor, { name: 'Not in A' });
		await expectInvalid(
			await as.lead.json('POST', '/api/jobs', { complaint: 'x', customerId: theirs.id }),
			'customerId'
		);
	});

	it('refuses a technician or apprentice assigning a job to someone else (403)', async () => {
		for (const role of ['technician', 'apprentice'] as const) {
			const r = await as[role].json('POST', '/api/jobs', {
				complaint: 'For someone else',
				assigneeId: a.users.lead.id
			});
			await expectError(r, 403, 'forbidden');
		}
	});

	it('lets a lead assign an apprentice but not a lead', async () => {
		const job = await newJob(as.lead, { complaint: 'For Jory', assigneeId: a.users.apprentice.id });
		expect(job.assigneeId).toBe(a.users.apprentice.id);
		await expectInvalid(
			await as.lead.json('POST', '/api/jobs', { complaint: 'x', assigneeId: a.users.lead.id }),
			'assigneeId'
		);
	});

	it('answers 401 on every jobs, customers and vehicles route when signed out', async () => {
		const { Client } = await import('../helpers/http');
		const out = new Client(as.lead.base);
		const id = jobOfB;
		const routes: [string, string][] = [
			['GET', '/api/jobs'],
			['POST', '/api/jobs'],
			['GET', `/api/jobs/${id}`],
			['PATCH', `/api/jobs/${id}`],
			['POST', `/api/jobs/${id}/status`],
			['GET', '/api/jobs/assignees'],
			['GET', '/api/customers'],
			['POST', '/api/customers'],
			['GET', `/api/customers/${id}`],
			['PATCH', `/api/customers/${id}`],
			['GET', '/api/vehicles'],
			['POST', '/api/vehicles'],
			['GET', `/api/vehicles/${id}`],
			['PATCH', `/api/vehicles/${id}`]
		];
		for (const [method, path] of routes) {
			const r = method === 'GET' ? await out.get(path) : await out.json(method, path, {});
			expect(r.status, `${method} ${path}`).toBe(401);
			expect((await r.json()).error.code).toBe('signed_out');
		}
	});
});

describe('GET /api/jobs', () => {
	let t: string;
	let made: { id: string; number: number }[];
	beforeAll(async () => {
		t = tag('list');
		made = [];
		const plan: [string, Role][] = [
			['open', 'technician'],
			['testing', 'technician'],
			['awaiting_parts', 'apprentice'],
			['closed', 'technician'],
			['open', 'apprentice']
		];
		for (const [status, who] of plan) {
			const j = await jobs.create(a.users.lead.actor, {
				complaint: `${t} ${status}`,
				status,
				assigneeId: a.users[who].id
			});
			made.push({ id: j.id as string, number: j.number as number });
		}
	});

	const get = async (c: Client, qs: string) => {
		const r = await c.get(`/api/jobs?${qs}`);
		expect(r.status, await r.clone().text()).toBe(200);
		return r.json();
	};

	it('answers { items, total, page, pageSize } with customer, vehicle and assignee', async () => {
		const body = await get(as.lead, `q=${t}`);
		expect(Object.keys(body).sort()).toEqual(['items', 'page', 'pageSize', 'total']);
		expect(body.total).toBe(4); // closed jobs are left out by default
		expect(body.items[0]).toHaveProperty('assignee.name');
		expect(body.items[0]).toHaveProperty('customer');
		expect(body.items[0]).toHaveProperty('vehicle');
	});

	it('keeps the first screen’s default: open jobs, newest first', async () => {
		const body = await get(as.lead, '');
		const numbers = body.items.map((j: { number: number }) => j.number);
		expect(numbers).toEqual([...numbers].sort((x, y) => y - x));
		expect(body.items.some((j: { status: string }) => j.status === 'closed')).toBe(false);
	});

	it('filters by status on the server', async () => {
		expect((await get(as.lead, `q=${t}&status=testing`)).total).toBe(1);
		expect((await get(as.lead, `q=${t}&status=all`)).total).toBe(5);
		expect((await get(as.lead, `q=${t}&status=closed`)).items[0].id).toBe(made[3].id);
	});

	it('filters by assignee: a person, me and no one', async () => {
		const body = await get(as.lead, `q=${t}&assignee=${a.users.apprentice.id}`);
		expect(body.items.map((j: { id: string }) => j.id).sort()).toEqual(
			[made[2].id, made[4].id].sort()
		);
		expect((await get(as.lead, `q=${t}&assignee=none`)).total).toBe(0);
		expect((await get(as.technician, `q=${t}&assignee=me&status=all`)).total).toBe(3);
	});

	it('shows technicians and apprentices only the jobs assigned to them', async () => {
		const tech = await get(as.technician, `q=${t}&status=all`);
		expect(tech.total).toBe(3);
		const appr = await get(as.apprentice, `q=${t}&assignee=${a.users.technician.id}`);
		expect(appr.total).toBe(0);
	});

	it('filters by the day a job was opened', async () => {
		const today = new Date().toISOString().slice(0, 10);
		const yesterday = new Date(Date.now() - 86_400_000).toISOString().slice(0, 10);
		expect((await get(as.lead, `q=${t}&from=${today}&to=${today}`)).total).toBe(4);
		expect((await get(as.lead, `q=${t}&to=${yesterday}`)).total).toBe(0);
	});

	it('sorts and pages on the server', async () => {
		const numbers = made.filter((_, i) => i !== 3).map((m) => m.number);
		const asc = await get(as.lead, `q=${t}&sort=number&pageSize=2&page=2`);
		expect(asc.items.map((j: { number: number }) => j.number)).toEqual(numbers.slice(2, 4));
		expect(asc).toMatchObject({ total: 4, page: 2, pageSize: 2 });
		const desc = await get(as.lead, `q=${t}&sort=-number&pageSize=3`);
		expect(desc.items.map((j: { number: number }) => j.number)).toEqual(
			[...numbers].reverse().slice(0, 3)
		);
		const status = await get(as.lead, `q=${t}&sort=status`);
		expect(status.items.map((j: { status: string }) => j.status)).toEqual([
			'open',
			'open',
			'testing',
			'awaiting_parts'
		]);
	});

	it('finds a job by its number', async () => {
		const body = await get(as.lead, `q=${made[1].number}&status=all`);
		expect(body.items.map((j: { id: string }) => j.id)).toContain(made[1].id);
	});

	it('answers 400 naming a parameter it cannot read', async () => {
		for (const [qs, field] of [
			['status=finished', 'status'],
			['sort=colour', 'sort'],
			['pageSize=500', 'pageSize'],
			['from=yesterday', 'from'],
			['assignee=someone', 'assignee']
		]) {
			await expectInvalid(await as.lead.get(`/api/jobs?${qs}`), field);
		}
	});

	it('never lists another workshop’s jobs', async () => {
		const body = await get(as.lead, 'status=all&pageSize=100');
		expect(body.items.map((j: { id: string }) => j.id)).not.toContain(jobOfB);
		expect((await get(bs.lead, `q=${t}&status=all`)).total).toBe(0);
	});
});

describe('GET /api/jobs/:id', () => {
	it('answers the job with its parties and its status history', async () => {
		const job = await newJob(as.technician, { complaint: 'Read me' });
		const r = await as.technician.get(`/api/jobs/${job.id}`);
		expect(r.status).toBe(200);
		const body = await r.json();
		expect(body.job).toMatchObject({
			id: job.id,
			complaint: 'Read me',
			assignee: { id: a.users.technician.id }
		});
		expect(body.history).toHaveLength(1);
		expect(body.history[0]).toMatchObject({ status: 'open', by: { id: a.users.technician.id } });
	});

	it('answers 404 for another workshop’s job and for an id that is not one', async () => {
		await expectError(await as.lead.get(`/api/jobs/${jobOfB}`), 404, 'not_found');
		await expectError(await as.lead.get('/api/jobs/not-a-uuid'), 404, 'not_found');
	});

	it('answers 404 to an apprentice for a job not assigned to them', async () => {
		const job = await newJob(as.technician, { complaint: 'Not for the apprentice' });
		await expectError(await as.apprentice.get(`/api/jobs/${job.id}`), 404, 'not_found');
	});
});

describe('PATCH /api/jobs/:id', () => {
	it('changes only the fields sent and bumps the version', async () => {
		const job = await newJob(as.technician, {
			complaint: 'Keep my codes',
			status: 'testing',
			codesBefore: [{ code: 'p0301', text: 'Cylinder 1 misfire' }]
		});
		expect(job.codesBefore).toEqual([{ code: 'P0301', text: 'Cylinder 1 misfire' }]);
		const r = await as.technician.json('PATCH', `/api/jobs/${job.id}`, {
			baseVersion: 1,
			notes: 'Coil 1 swapped to cylinder 2'
		});
		expect(r.status).toBe(200);
		const { job: next } = await r.json();
		expect(next).toMatchObject({
			version: 2,
			notes: 'Coil 1 swapped to cylinder 2',
			status: 'testing',
			codesBefore: [{ code: 'P0301', text: 'Cylinder 1 misfire' }]
		});
		const rows = await AuditEntry.findAll({ where: { entityId: job.id, action: 'update' } });
		expect(rows.map((x) => x.field)).toEqual(['notes']);
	});

	it('answers 400 for a malformed body, a missing version and an invalid field', async () => {
		const job = await newJob(as.technician, { complaint: 'Bad patches' });
		await expectError(
			await as.technician.json('PATCH', `/api/jobs/${job.id}`, '{'),
			400,
			'invalid'
		);
		await expectInvalid(
			await as.technician.json('PATCH', `/api/jobs/${job.id}`, { notes: 'no version' }),
			'baseVersion'
		);
		await expectInvalid(
			await as.technician.json('PATCH', `/api/jobs/${job.id}`, { baseVersion: 1, status: 'done' }),
			'status'
		);
	});

	it('lets an apprentice edit their own job but not another’s (403)', async () => {
		const own = await newJob(as.apprentice, { complaint: 'Mine' });
		const r = await as.apprentice.json('PATCH', `/api/jobs/${own.id}`, {
			baseVersion: 1,
			location: 'Bay 3'
		});
		expect(r.status).toBe(200);
		const other = await newJob(as.lead, { complaint: 'Not yours' });
		await expectError(
			await as.apprentice.json('PATCH', `/api/jobs/${other.id}`, { baseVersion: 1, location: 'x' }),
			403,
			'forbidden'
		);
		expect((await Job.findByPk(other.id))!.location).toBeNull();
	});

	it('lets only a lead reassign a job', async () => {
		const job = await newJob(as.technician, { complaint: 'Reassign me' });
		await expectError(
			await as.technician.json('PATCH', `/api/jobs/${job.id}`, {
				baseVersion: 1,
				assigneeId: a.users.apprentice.id
			}),
			403,
			'forbidden'
		);
		const r = await as.lead.json('PATCH', `/api/jobs/${job.id}`, {
			baseVersion: 1,
			assigneeId: a.users.apprentice.id
		});
		expect((await r.json()).job.assigneeId).toBe(a.users.apprentice.id);
	});

	it('answers 404 for another workshop’s job', async () => {
		await expectError(
			await as.lead.json('PATCH', `/api/jobs/${jobOfB}`, { baseVersion: 1, notes: 'x' }),
			404,
			'not_found'
		);
		expect((await Job.findByPk(jobOfB))!.notes).toBeNull();
	});

	it('answers 409 with the current record when the version is stale', async () => {
		const job = await newJob(as.technician, { complaint: 'Two phones' });
		await expectStaleRefused(as, 'jobs', job.id, { location: 'Bay 1' }, { location: 'Driveway' });
		expect((await Job.findByPk(job.id))!.location).toBe('Bay 1');
	});
});

describe('POST /api/jobs/:id/status', () => {
	const move = (c: Client, id: string, status: string, baseVersion: number) =>
		c.json('POST', `/api/jobs/${id}/status`, { status, baseVersion });

	it('records every change with who and when, newest first, as audit rows', async () => {
		const job = await newJob(as.technician, { complaint: 'Walk the statuses' });
		const walk = ['testing', 'awaiting_authorisation', 'awaiting_parts', 'repaired', 'retested_ok'];
		let version = 1;
		for (const status of walk) {
			// "Re-tested OK" needs a finished re-test after the repair (the closing rules' own tests
			// are in signoffs.test.ts): a first test of cylinder 1, then its re-test.
			if (status === 'retested_ok') {
				const first = create('test', {
					jobId: job.id,
					partNumber: 'JB-1',
					position: '1',
					state: 'done'
				});
				const again = create('test', {
					jobId: job.id,
					partNumber: 'JB-1',
					position: '1',
					state: 'done',
					retestOf: first.entityId
				});
				const reading = create('reading', {
					testId: again.entityId,
					checkKey: 'primary',
					position: '1',
					samples: [{ value: 0.5, unit: 'Ω' }]
				});
				expect(
					(await push(as.technician, 'walk-phone', [first, again, reading])).map((x) => x.status)
				).toEqual(['applied', 'applied', 'applied']);
			}
			const r = await move(as.technician, job.id, status, version);
			expect(r.status).toBe(200);
			version = (await r.json()).job.version;
		}
		const r = await move(as.lead, job.id, 'closed', version);
		const body = await r.json();
		expect(body.job.status).toBe('closed');
		expect(body.history.map((h: { status: string }) => h.status)).toEqual(
			['open', ...walk, 'closed'].reverse()
		);
		expect(body.history[0]).toMatchObject({ from: 'retested_ok', by: { id: a.users.lead.id } });
		expect(body.history[1].by.id).toBe(a.users.technician.id);
		expect(new Date(body.history[0].at).getTime()).toBeGreaterThanOrEqual(
			new Date(body.history[1].at).getTime()
		);
		const rows = await AuditEntry.findAll({
			where: { entity: 'job', entityId: job.id, field: 'status' },
			order: [['id', 'ASC']]
		});
		expect(rows.map((x) => JSON.parse(x.newValue!))).toEqual(['open', ...walk, 'closed']);
		expect(rows.at(-1)!.userId).toBe(a.users.lead.id);
	});

	it('answers 400 for a malformed body and for a status that does not exist', async () => {
		const job = await newJob(as.technician, { complaint: 'Bad status' });
		await expectError(
			await as.technician.json('POST', `/api/jobs/${job.id}/status`, 'status=testing'),
			400,
			'invalid'
		);
		await expectInvalid(await move(as.technician, job.id, 'finished', 1), 'status');
		await expectInvalid(
			await as.technician.json('POST', `/api/jobs/${job.id}/status`, { status: 'testing' }),
			'baseVersion'
		);
	});

	it('does not let an apprentice close a job, nor a technician reopen one (403)', async () => {
		const own = await newJob(as.apprentice, { complaint: 'Apprentice job' });
		await expectError(await move(as.apprentice, own.id, 'closed', 1), 403, 'forbidden');
		const job = await newJob(as.technician, { complaint: 'Close and reopen' });
		expect((await move(as.technician, job.id, 'closed', 1)).status).toBe(200);
		await expectError(await move(as.technician, job.id, 'open', 2), 403, 'forbidden');
		expect((await move(as.lead, job.id, 'open', 2)).status).toBe(200);
	});

	it('answers 404 for another workshop’s job', async () => {
		await expectError(await move(as.lead, jobOfB, 'testing', 1), 404, 'not_found');
		expect((await Job.findByPk(jobOfB))!.status).toBe('open');
	});

	it('answers 409 with the current record when the version is stale', async () => {
		const job = await newJob(as.technician, { complaint: 'Stale status' });
		await move(as.lead, job.id, 'testing', 1);
		const e = await expectError(
			await move(as.technician, job.id, 'no_fault_found', 1),
			409,
			'stale_version'
		);
		expect(e.current).toMatchObject({ version: 2, status: 'testing' });
	});
});

describe('GET /api/jobs/assignees', () => {
	it('lists the workshop’s technicians and apprentices only', async () => {
		const body = await (await as.technician.get('/api/jobs/assignees')).json();
		expect(body.items.map((u: { id: string }) => u.id).sort()).toEqual(
			[a.users.technician.id, a.users.apprentice.id].sort()
		);
	});
});
