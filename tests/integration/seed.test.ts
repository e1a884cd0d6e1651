import { describe, expect, it } from 'vitest';
import { AuditEntry, Change, Component, Customer, Job, SpecSheet, User, Vehicle } from '../../src/lib/server/db/models';
import { modelYearCode } from '../../src/lib/domain/vin';
import { verifyPassword } from '../../src/lib/server/auth/password';
import { DEMO_PASSWORD, DEMO_USERS, DEMO_WORKSHOP, seedDemo } from '../../src/lib/server/seed/demo';

describe('the demo seed', () => {
	it('creates one user per role and open jobs for the technician and the apprentice', async () => {
		await seedDemo();
		const users = await User.findAll({ where: { workshopId: DEMO_WORKSHOP.id } });
		expect(users.map((u) => u.role).sort()).toEqual(['apprentice', 'lead', 'owner', 'technician']);
		const jobs = await Job.findAll({ where: { workshopId: DEMO_WORKSHOP.id, status: 'open' } });
		const assignees = jobs.map((j) => users.find((u) => u.id === j.assigneeId)?.role).sort();
		expect(assignees).toEqual(['apprentice', 'apprentice', 'technician', 'technician']);
		const tech = users.find((u) => u.role === 'technician')!;
		expect(await verifyPassword(tech.passwordHash, DEMO_PASSWORD)).toBe(true);
		expect(DEMO_USERS.every((d) => d.email.endsWith('.example'))).toBe(true);
	});

	it('gives every demo VIN the model-year code of its recorded year (49 CFR 565.15(a), position 10)', async () => {
		await seedDemo();
		const vehicles = await Vehicle.findAll({ where: { workshopId: DEMO_WORKSHOP.id } });
		expect(vehicles.length).toBeGreaterThanOrEqual(3);
		for (const v of vehicles) expect(`${v.vin} ${v.vin![9]}`).toBe(`${v.vin} ${modelYearCode(v.year!)}`);
		expect(vehicles.every((v) => v.cylinders === 4)).toBe(true);
	});

	it('has a hybrid vehicle with a job, the two-coil pack on the apprentice’s job, and an airbag part', async () => {
		await seedDemo();
		const hybrid = await Vehicle.findOne({ where: { workshopId: DEMO_WORKSHOP.id, hybrid: true } });
		expect(await Job.count({ where: { vehicleId: hybrid!.id } })).toBe(1);
		const pack = await Component.findOne({ where: { workshopId: DEMO_WORKSHOP.id, kind: 'coil_pack' } });
		expect(pack!.positions).toEqual([
			{ position: 'A', cylinders: [1, 4] },
			{ position: 'B', cylinders: [2, 3] }
		]);
		const apprentice = DEMO_USERS.find((u) => u.role === 'apprentice')!;
		const jobs = await Job.findAll({ where: { assigneeId: apprentice.id } });
		const vehicles = await Vehicle.findAll({ where: { id: jobs.map((j) => j.vehicleId!) } });
		expect(vehicles.some((v) => v.model === (pack!.fitment as { model: string }[])[0].model)).toBe(true);
		const airbag = await Component.findAll({ where: { workshopId: DEMO_WORKSHOP.id } });
		expect(airbag.some((c) => ((c.cautions as string[] | null) ?? []).includes('airbag'))).toBe(true);
	});

	it('hints the lowest Ω range for the coil’s primary winding, the range that can resolve it', async () => {
		await seedDemo();
		const sheets = await SpecSheet.findAll({ where: { workshopId: DEMO_WORKSHOP.id } });
		const primaries = sheets.flatMap((s) => (s.checks as { key: string; rangeHint: string | null }[]).filter((c) => c.key.startsWith('primary')));
		expect(primaries.length).toBeGreaterThan(0);
		expect(primaries.every((c) => c.rangeHint === 'lowest Ω range')).toBe(true);
	});

	it('is idempotent: a second run creates nothing and writes no rows', async () => {
		await seedDemo();
		const counts = async () => [
			await Customer.count(),
			await Job.count(),
			await Change.count(),
			await AuditEntry.count(),
			await User.count()
		];
		const before = await counts();
		expect(await seedDemo()).toBe(0);
		expect(await counts()).toEqual(before);
	});
});

describe('the demo no-start job', () => {
	it('has the invented battery, alternator, relay and crank sensor with approved sheets, and its tests judged by the server', async () => {
		await seedDemo();
		const { NO_START_JOB, NO_START_PARTS } = await import('../../src/lib/server/seed/demo-circuits');
		const { db } = await import('../../src/lib/server/db');
		const { QueryTypes } = await import('sequelize');
		const job = await Job.findOne({ where: { id: NO_START_JOB.id } });
		expect(job?.complaint).toMatch(/No start/);
		const kinds = (await Component.findAll({ where: { id: NO_START_PARTS.map((p) => p.id) } })).map((c) => c.kind).sort();
		expect(kinds).toEqual(['alternator', 'battery', 'crank_cam_sensor', 'relay']);
		const rows = await db().query<{ kind: string; server_verdict: string }>('SELECT kind, server_verdict FROM circuit_tests WHERE job_id = ? ORDER BY seq', {
			replacements: [NO_START_JOB.id],
			type: QueryTypes.SELECT
		});
		// 12.08 V at 8 °C → 12.16 V at 26.7 °C on the flooded table (EFB; BCI): 39 % → charge and re-test; 240 mA against 50 mA → over.
		expect(rows).toEqual([
			{ kind: 'battery', server_verdict: 'charge_retest' },
			{ kind: 'parasitic', server_verdict: 'high' }
		]);
		await seedDemo(); // idempotent
		expect(await db().query('SELECT id FROM circuit_tests WHERE job_id = ?', { replacements: [NO_START_JOB.id], type: QueryTypes.SELECT })).toHaveLength(2);
	});
});
