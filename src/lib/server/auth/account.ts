/**
 * The signed-in user's own password (OWASP ASVS 5.0 §6.2.2, §6.2.3, §7.4.3, §7.5.1): the
 * current password is asked again (wrong answers count against the sign-in throttle, so the
 * form cannot be used to guess it), the new one follows the same rule as a new account's,
 * and the change is audited without either value. The caller then ends every session of the
 * user and starts a fresh one for this browser.
 */
import { z } from 'zod';
import { db } from '../db';
import { writeAudit } from '../db/feed';
import { User } from '../db/models';
import { newUser } from '../services/workshops';
import { hashPassword, verifyPassword } from './password';
import { clearAccount, recordFailure, retryAfter } from './rate-limit';
import { tooMany } from './sign-in';
import type { SessionUser } from './types';

export const passwordChange = z
	.object({
		current: z.string().min(1, 'Enter your current password').max(200),
		next: newUser.shape.password,
		repeat: z.string().max(200)
	})
	.refine((f) => f.next === f.repeat, { path: ['repeat'], message: 'The two new passwords differ' })
	.refine((f) => f.next !== f.current, { path: ['next'], message: 'Choose a password you have not used here' });

export type PasswordChangeResult =
	| { ok: true }
	| { ok: false; status: 400 | 429; fields: Record<string, string>; message?: string };

/** Check the current password and store the new one; nothing changes on any failure. */
export async function changePassword(user: SessionUser, input: unknown, address: string): Promise<PasswordChangeResult> {
	const wait = await retryAfter(user.email, address);
	if (wait > 0) return { ok: false, status: 429, fields: {}, message: tooMany(wait) };
	const parsed = passwordChange.safeParse(input);
	if (!parsed.success) {
		const fields: Record<string, string> = {};
		for (const i of parsed.error.issues) fields[String(i.path[0] ?? '_')] ??= i.message;
		return { ok: false, status: 400, fields };
	}
	const row = await User.findByPk(user.id);
	if (!row?.active || !(await verifyPassword(row.passwordHash, parsed.data.current))) {
		await recordFailure(user.email, address);
		return { ok: false, status: 400, fields: { current: 'That is not your current password' } };
	}
	const passwordHash = await hashPassword(parsed.data.next);
	await db().transaction(async (t) => {
		await User.update({ passwordHash }, { where: { id: user.id }, transaction: t });
		const actor = { userId: user.id, workshopId: user.workshopId, role: user.role, deviceId: 'web' };
		await writeAudit(t, actor, 'user', user.id, 'password_change', [], null);
	});
	await clearAccount(user.email);
	return { ok: true };
}
