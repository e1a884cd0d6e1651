/** Small builders for integration tests: a fresh workshop with one user per role. */
import { v7 as uuidv7 } from 'uuid';
import type { Actor } from '../../src/lib/server/auth/types';
import { createUser, createWorkshop } from '../../src/lib/server/services/workshops';

export const TEST_PASSWORD = 'test-password-123';

export async function makeWorkshop(label = 'Test') {
	const w = await createWorkshop(`${label} workshop ${uuidv7().slice(-6)}`);
	const tag = uuidv7().slice(-12);
	const users = {} as Record<
		'owner' | 'lead' | 'technician' | 'apprentice',
		{ id: string; email: string; actor: Actor }
	>;
	for (const role of ['owner', 'lead', 'technician', 'apprentice'] as const) {
		const email = `${role}-${tag}@test.example`;
		const u = await createUser(w.id, {
			email,
			name: `${role} ${tag}`,
			role,
			password: TEST_PASSWORD
		});
		users[role] = {
			id: u.id,
			email,
			actor: { userId: u.id, workshopId: w.id, role, deviceId: 'test' }
		};
	}
	return { workshop: w, users };
}
