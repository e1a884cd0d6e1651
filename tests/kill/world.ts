/**
 * The invented workshop the kill test works in: four people (two technicians, a lead and an
 * owner), two jobs assigned to each, and one ignition coil with an approved sheet of two
 * checks. Created through the services (the one write path), in the database named by the
 * environment.
 */
import { v7 as uuidv7 } from 'uuid';
import { components, sheets } from '../../src/lib/server/services/components';
import { jobs } from '../../src/lib/server/services/jobs';
import { createUser, createWorkshop } from '../../src/lib/server/services/workshops';
import type { PhoneUser, World } from './phone';

export const KILL_PASSWORD = 'kill-test-password-9';

/**
 * A coil's primary winding 0.36–0.55 Ω cold and 0.45–0.65 Ω hot; the secondary 5.5–9.5 kΩ —
 * common practice, invented figures for this test.
 */
const CHECKS = [
	{ key: 'primary', label: 'Primary winding', quantity: 'resistance', from: '1', to: '2', condition: 'key_off', unit: 'Ω', openOk: false,
		bands: [{ fromC: null, toC: 50, min: 0.36, max: 0.55 }, { fromC: 50, toC: 100, min: 0.45, max: 0.65 }] },
	{ key: 'secondary', label: 'Secondary winding', quantity: 'resistance', from: '1', to: 'HT', condition: 'key_off', unit: 'kΩ', openOk: false,
		bands: [{ fromC: null, toC: null, min: 5500, max: 9500 }] }
];

export async function makeWorld(): Promise<{ workshopId: string; users: PhoneUser[]; world: World }> {
	const w = await createWorkshop(`Kill test workshop ${uuidv7().slice(-6)}`);
	const roles = ['technician', 'technician', 'lead', 'owner'] as const;
	const users: PhoneUser[] = [];
	for (const [i, role] of roles.entries()) {
		const email = `${role}-${i}@kill.example`;
		const u = await createUser(w.id, { email, name: `${role} ${i}`, role, password: KILL_PASSWORD });
		users.push({ id: u.id, email, role, jobs: [] });
	}
	const lead = { userId: users[2].id, workshopId: w.id, role: 'lead' as const, deviceId: 'office' };
	for (const u of users) {
		for (let k = 1; k <= 2; k++) {
			// Jobs are assigned to technicians and apprentices; a lead's or owner's phone works on unassigned ones.
			const assigneeId = u.role === 'technician' ? u.id : null;
			const job = await jobs.create(lead, { complaint: `Misfire ${k} for ${u.role}`, assigneeId });
			u.jobs.push(job.id as string);
		}
	}
	const component = await components.create(lead, { partNumber: `KT-${uuidv7().slice(-6)}`, kind: 'ignition_coil' });
	const draft = await sheets.create(lead, { componentId: component.id, checks: CHECKS });
	await sheets.update(lead, draft.id as string, draft.version as number, {}, {
		serverFields: { state: 'approved', approvedBy: lead.userId, approvedAt: new Date() }
	});
	return {
		workshopId: w.id,
		users,
		world: { componentId: component.id as string, sheetId: draft.id as string, checkKeys: CHECKS.map((c) => c.key), password: KILL_PASSWORD }
	};
}
