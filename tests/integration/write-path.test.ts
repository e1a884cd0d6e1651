import { QueryTypes } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { beforeAll, describe, expect, it } from 'vitest';
import { db } from '../../src/lib/server/db';
import { AuditEntry, Change, Customer } from '../../src/lib/server/db/models';
import { StaleVersionError, ValidationError } from '../../src/lib/server/errors';
import * as customers from '../../src/lib/server/services/customers';
import { makeWorkshop } from '../helpers/fixtures';

let ws: Awaited<ReturnType<typeof makeWorkshop>>;
beforeAll(async () => {
	ws = await makeWorkshop('Write path');
});

const seqs = async (workshopId: string) =>
	(await Change.findAll({ where: { workshopId }, order: [['seq', 'ASC']] })).map((c) =>
		Number(c.seq)
	);

describe('the one write path', () => {
	it('creates a record at version 1 with an audit row per field and one change row', async () => {
		const actor = ws.users.technician.actor;
		const rec = await customers.create(actor, { name: 'Wendell Oakhart', phone: '0100 555 0199' });
		expect(rec.version).toBe(1);
		const audit = await AuditEntry.findAll({ where: { entityId: rec.id as string } });
		expect(audit.map((a) => a.field).sort()).toEqual(['name', 'phone', 'reportConsent']); // e-mail not given
		expect(audit.every((a) => a.userId === actor.userId && a.action === 'create')).toBe(true);
		const changes = await Change.findAll({ where: { entityId: rec.id as string } });
		expect(changes).toHaveLength(1);
		expect(JSON.parse(changes[0].record!).name).toBe('Wendell Oakhart');
	});

	it('bumps the version on update and audits old and new values of the changed field only', async () => {
		const actor = ws.users.lead.actor;
		const rec = await customers.create(actor, { name: 'Alma Ridgeby', phone: '0100 555 0111' });
		const next = await customers.update(actor, rec.id as string, 1, {
			phone: '0100 555 0112',
			name: 'Alma Ridgeby'
		});
		expect(next.version).toBe(2);
		const rows = await AuditEntry.findAll({
			where: { entityId: rec.id as string, action: 'update' }
		});
		expect(rows).toHaveLength(1);
		expect(rows[0].field).toBe('phone');
		expect(JSON.parse(rows[0].oldValue!)).toBe('0100 555 0111');
		expect(JSON.parse(rows[0].newValue!)).toBe('0100 555 0112');
		const fv = JSON.parse((await Customer.findByPk(rec.id as string))!.fieldVersions);
		expect(fv).toMatchObject({ phone: 2, name: 1 });
	});

	it('refuses a stale version with a typed conflict error carrying the current record', async () => {
		const actor = ws.users.lead.actor;
		const rec = await customers.create(actor, { name: 'Bram Tully' });
		await customers.update(actor, rec.id as string, 1, { name: 'Bram Tully-Ashe' });
		const err = await customers
			.update(actor, rec.id as string, 1, { name: 'Other' })
			.catch((e) => e);
		expect(err).toBeInstanceOf(StaleVersionError);
		expect((err as StaleVersionError).current).toMatchObject({
			version: 2,
			name: 'Bram Tully-Ashe'
		});
	});

	it('rejects invalid input naming the field, and writes nothing', async () => {
		const before = await seqs(ws.workshop.id);
		const err = await customers
			.create(ws.users.lead.actor, { name: '', email: 'nope' })
			.catch((e) => e);
		expect(err).toBeInstanceOf(ValidationError);
		expect(Object.keys((err as ValidationError).fields).sort()).toEqual(['email', 'name']);
		expect(await seqs(ws.workshop.id)).toEqual(before);
	});

	it('rolls back the record, its audit rows and its change row together', async () => {
		const before = await seqs(ws.workshop.id);
		const id = uuidv7();
		await expect(
			db().transaction(async (t) => {
				await customers.create(
					ws.users.lead.actor,
					{ name: 'Rolled Back' },
					{ id, transaction: t }
				);
				throw new Error('boom');
			})
		).rejects.toThrow('boom');
		expect(await Customer.findByPk(id)).toBeNull();
		expect(await AuditEntry.count({ where: { entityId: id } })).toBe(0);
		expect(await seqs(ws.workshop.id)).toEqual(before);
	});

	it('gives gap-free increasing seq numbers under concurrent writers', async () => {
		const fresh = await makeWorkshop('Concurrent');
		const actor = fresh.users.lead.actor;
		await Promise.all(
			Array.from({ length: 24 }, (_, i) => customers.create(actor, { name: `Customer ${i}` }))
		);
		const list = await seqs(fresh.workshop.id);
		expect(list).toEqual(Array.from({ length: 24 }, (_, i) => i + 1));
		const [row] = await db().query<{ last_seq: number }>(
			'SELECT last_seq FROM change_counters WHERE workshop_id = ?',
			{ replacements: [fresh.workshop.id], type: QueryTypes.SELECT }
		);
		expect(Number(row.last_seq)).toBe(24);
	});

	it('never lets a reader see a later seq before an earlier, slower commit', async () => {
		const fresh = await makeWorkshop('Late commit');
		const actor = fresh.users.lead.actor;
		let release!: () => void;
		const gate = new Promise<void>((r) => (release = r));
		const slow = db().transaction(async (t) => {
			await customers.create(actor, { name: 'Slow writer' }, { transaction: t });
			await gate;
		});
		await new Promise((r) => setTimeout(r, 100));
		const fast = customers.create(actor, { name: 'Fast writer' });
		await new Promise((r) => setTimeout(r, 200));
		expect(await seqs(fresh.workshop.id)).toEqual([]); // the fast writer waits for the counter row
		release();
		await Promise.all([slow, fast]);
		expect(await seqs(fresh.workshop.id)).toEqual([1, 2]);
	});

	it('keeps workshops apart: another workshop’s record is not found', async () => {
		const other = await makeWorkshop('Other');
		const rec = await customers.create(other.users.lead.actor, { name: 'Not yours' });
		await expect(customers.read(ws.users.lead.actor, rec.id as string)).rejects.toMatchObject({
			status: 404
		});
		await expect(
			customers.update(ws.users.lead.actor, rec.id as string, 1, { name: 'x' })
		).rejects.toMatchObject({
			status: 404
		});
	});
});

describe('a partial update', () => {
	it('changes only the fields sent, never resetting others to their defaults', async () => {
		const actor = ws.users.lead.actor;
		const rec = await customers.create(actor, { name: 'Keep Consent', reportConsent: true });
		const next = await customers.update(actor, rec.id as string, 1, { phone: '0100 555 0177' });
		expect(next).toMatchObject({ phone: '0100 555 0177', reportConsent: true, version: 2 });
	});
});
