import { describe, expect, it } from 'vitest';
import { AuditEntry, Change, Customer, Job, User } from '../../src/lib/server/db/models';
import { verifyPassword } from '../../src/lib/server/auth/password';
import { DEMO_PASSWORD, DEMO_USERS, DEMO_WORKSHOP, seedDemo } from '../../src/lib/server/seed/demo';

describe('the demo seed', () => {
	it('creates one user per role and two open jobs for the technician and the apprentice', async () => {
		await seedDemo();
		const users = await User.findAll({ where: { workshopId: DEMO_WORKSHOP.id } });
		expect(users.map((u) => u.role).sort()).toEqual(['apprentice', 'lead', 'owner', 'technician']);
		const jobs = await Job.findAll({ where: { workshopId: DEMO_WORKSHOP.id, status: 'open' } });
		const assignees = jobs.map((j) => users.find((u) => u.id === j.assigneeId)?.role).sort();
		expect(assignees).toEqual(['apprentice', 'technician']);
		const tech = users.find((u) => u.role === 'technician')!;
		expect(await verifyPassword(tech.passwordHash, DEMO_PASSWORD)).toBe(true);
		expect(DEMO_USERS.every((d) => d.email.endsWith('.example'))).toBe(true);
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
