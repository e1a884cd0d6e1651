/**
 * The clash inbox: two phones change the same field of a job before seeing each other's
 * change; the lead sees the clash in words on /conflicts (only their workshop's), settles it
 * by picking a phone's value or giving one, with a note, through the page's form or the JSON
 * API; the audit trail names the settler, and the other phone's next pull brings the value.
 */
import { v7 as uuidv7 } from 'uuid';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { AuditEntry, Job } from '../../src/lib/server/db/models';
import { jobs } from '../../src/lib/server/services/jobs';
import { deskWorkshop } from '../helpers/desk';
import { op, pullAll, push } from '../helpers/sync';

const base = inject('baseURL');
let w: Awaited<ReturnType<typeof deskWorkshop>>;
let other: Awaited<ReturnType<typeof deskWorkshop>>;
// Device ids are UUIDv7 made on the phone: phone 1 was first used before phone 2.
const PHONE_1 = uuidv7();
const PHONE_2 = uuidv7();

type Item = { conflictId: string; entityId: string; field: string };
const openList = async (c = w.as.lead) =>
	(await (await c.get('/api/conflicts')).json()).items as Item[];

/** A job of the technician, and a clash on `field`: phone 1 lands first, phone 2 clashes. */
async function clash(field: string, first: unknown, second: unknown) {
	const job = await jobs.create(w.users.lead.actor, {
		complaint: 'Cuts out when warm',
		assigneeId: w.users.technician.id
	});
	const id = job.id as string;
	expect(
		(await push(w.as.technician, PHONE_1, [op('job', 'patch', id, { [field]: first }, 1)]))[0]
			.status
	).toBe('applied');
	const res = await push(w.as.technician, PHONE_2, [
		op('job', 'patch', id, { [field]: second }, 1)
	]);
	expect(res[0].status).toBe('conflict');
	return { job, id, conflictId: res[0].conflictId! };
}

beforeAll(async () => {
	w = await deskWorkshop(base, 'Clashes');
	other = await deskWorkshop(base, 'Clashes elsewhere');
});

describe('the clash inbox', () => {
	it('says so when nothing waits', async () => {
		const html = await (await w.as.lead.get('/conflicts', 'text/html')).text();
		expect(html).toContain('No clashes to settle');
		expect(html).toContain('Nothing waits for you');
	});

	it('shows each open clash of the workshop in words: the record, the field, the stored value and each phone’s, with who and which phone', async () => {
		const { job, conflictId } = await clash('status', 'testing', 'awaiting_parts');
		const theirs = await jobs.create(other.users.lead.actor, {
			complaint: 'Elsewhere',
			assigneeId: other.users.technician.id
		});
		await push(other.as.technician, 'x-1', [
			op('job', 'patch', theirs.id as string, { status: 'repaired' }, 1)
		]);
		await push(other.as.technician, 'x-2', [
			op('job', 'patch', theirs.id as string, { status: 'closed' }, 1)
		]);

		const items = await openList();
		expect(items.map((i) => i.conflictId)).toEqual([conflictId]);
		expect((await openList(other.as.lead)).some((i) => i.conflictId === conflictId)).toBe(false);

		const r = await w.as.lead.get('/conflicts', 'text/html');
		expect(r.status).toBe(200);
		const html = await r.text();
		expect(html).toContain(`Job ${job.number}`);
		expect(html).toContain('Two edits clash — pick one: <strong>Status</strong>');
		expect(html).toMatch(/data-testid="stored-value"[^>]*>Testing</);
		expect(html).toMatch(/data-testid="phone-value"[^>]*>Awaiting parts</);
		expect(html).toContain(`${w.users.technician.email.split('@')[0].replace('-', ' ')} · phone 1`);
		expect(html).toContain('phone 2');
		expect(html).not.toContain('awaiting_parts<'); // never the code
		expect((await w.as.technician.get('/conflicts', 'text/html')).status).toBe(403);
		expect((await w.as.apprentice.get('/api/conflicts')).status).toBe(403);
	});

	it('settles by picking a phone’s value on the page; the audit names the settler and the note, and the first phone’s pull brings the value', async () => {
		const { id, conflictId } = await clash('location', 'Bay 2', 'Customer’s driveway');
		const { cursor } = await pullAll(w.as.technician, 0, 500);
		const r = await w.as.lead.form('/conflicts?/settle', {
			conflictId,
			choice: `phone:${PHONE_2}`,
			note: 'Rang the customer: the car stays at home'
		});
		expect(r.status).toBe(200);
		const html = await r.text();
		expect(html).toContain('Settled:');
		expect(html).toContain('Rang the customer: the car stays at home');
		expect((await Job.findByPk(id))!.location).toBe('Customer’s driveway');
		expect((await openList()).some((i) => i.conflictId === conflictId)).toBe(false);

		const audit = await AuditEntry.findOne({
			where: { entity: 'conflict', entityId: conflictId, action: 'settle' }
		});
		expect(audit?.userId).toBe(w.users.lead.id);
		expect(JSON.parse(audit!.newValue!)).toMatchObject({
			pick: 'candidate',
			value: 'Customer’s driveway',
			note: 'Rang the customer: the car stays at home'
		});
		const change = await AuditEntry.findOne({
			where: { entity: 'job', entityId: id, field: 'location', userId: w.users.lead.id }
		});
		expect(change).not.toBeNull();

		const after = await pullAll(w.as.technician, cursor, 500);
		const mine = after.changes.filter((c) => c.entity === 'job' && c.entityId === id);
		expect(mine.at(-1)?.record).toMatchObject({ location: 'Customer’s driveway' });
	});

	it('keeps the lead’s choice when the first phone later sends an edit made before it: that clashes instead of overwriting', async () => {
		const { id, conflictId } = await clash('notes', 'Plug 3 oily', 'Plug 3 replaced');
		expect(
			(
				await w.as.lead.json('POST', `/api/conflicts/${conflictId}`, {
					pick: 'candidate',
					deviceId: PHONE_2
				})
			).status
		).toBe(200);
		// Phone 1 last saw version 2 (its own change) and edits the notes again, offline.
		const late = await push(w.as.technician, PHONE_1, [
			op('job', 'patch', id, { notes: 'Plug 3 oily, boot cracked' }, 2)
		]);
		expect(late[0].status).toBe('conflict');
		expect((await Job.findByPk(id))!.notes).toBe('Plug 3 replaced');
	});

	it('settles with a value the lead types, refusing one the job does not accept with the job’s own message', async () => {
		const { id, conflictId } = await clash('status', 'repaired', 'no_fault_found');
		const bad = await w.as.lead.json('POST', `/api/conflicts/${conflictId}`, {
			pick: 'value',
			value: 'fixed-ish'
		});
		expect(bad.status).toBe(400);
		expect((await bad.json()).error.fields.status).toBeTruthy();
		const badForm = await w.as.lead.form('/conflicts?/settle', {
			conflictId,
			choice: 'own',
			value: 'fixed-ish'
		});
		expect(badForm.status).toBe(400);
		const ok = await w.as.lead.json('POST', `/api/conflicts/${conflictId}`, {
			pick: 'value',
			value: 'awaiting_authorisation',
			note: 'Waiting for the customer’s yes'
		});
		expect(ok.status).toBe(200);
		expect((await Job.findByPk(id))!.status).toBe('awaiting_authorisation');
		const again = await w.as.lead.json('POST', `/api/conflicts/${conflictId}`, { pick: 'server' });
		expect(again.status).toBe(400);
	});

	it('keeping the stored value sends the record to the phones again, so a phone still showing its own value takes it', async () => {
		const { id, conflictId } = await clash('complaint', 'Stalls at junctions', 'No start when hot');
		const { cursor } = await pullAll(w.as.technician, 0, 500);
		const r = await w.as.lead.form('/conflicts?/settle', {
			conflictId,
			choice: 'stored',
			note: ''
		});
		expect(r.status).toBe(200);
		const job = await Job.findByPk(id);
		expect(job!.complaint).toBe('Stalls at junctions');
		const after = await pullAll(w.as.technician, cursor, 500);
		const resent = after.changes.filter((c) => c.entity === 'job' && c.entityId === id);
		expect(resent).toHaveLength(1);
		expect(resent[0]).toMatchObject({
			version: job!.version,
			record: { complaint: 'Stalls at junctions' }
		});
	});

	it('tells a phone which of its clashes still wait, so it can drop the settled ones', async () => {
		const { conflictId } = await clash('location', 'Bay 6', 'Bay 7');
		const ask = async (c = w.as.technician, ids = conflictId) =>
			(await (await c.get(`/api/conflicts/open?ids=${ids}`)).json()).open;
		expect(await ask()).toEqual([conflictId]);
		expect(await ask(other.as.technician)).toEqual([]);
		expect((await w.as.technician.get('/api/conflicts/open?ids=nope')).status).toBe(400);
		await w.as.lead.json('POST', `/api/conflicts/${conflictId}`, { pick: 'server' });
		expect(await ask()).toEqual([]);
	});

	it('refuses another workshop’s lead and a technician', async () => {
		const { conflictId } = await clash('location', 'Bay 4', 'Bay 5');
		expect(
			(await other.as.lead.json('POST', `/api/conflicts/${conflictId}`, { pick: 'server' })).status
		).toBe(404);
		expect(
			(await other.as.lead.form('/conflicts?/settle', { conflictId, choice: 'stored' })).status
		).toBe(404);
		expect(
			(await w.as.technician.json('POST', `/api/conflicts/${conflictId}`, { pick: 'server' }))
				.status
		).toBe(403);
		expect(
			(await w.as.technician.form('/conflicts?/settle', { conflictId, choice: 'stored' })).status
		).toBe(403);
		expect((await openList()).some((i) => i.conflictId === conflictId)).toBe(true);
		const html = await (await w.as.owner.get('/conflicts', 'text/html')).text();
		expect(html).toContain('Bay 5');
	});
});
