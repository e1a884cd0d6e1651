/**
 * Sign-in: throttle → find the user → verify (against a dummy hash for an unknown e-mail,
 * so both failures take about as long and say the same thing) → count or clear failures.
 */
import { User } from '../db/models';
import { dummyHash, verifyPassword } from './password';
import { clearAccount, recordFailure, retryAfter } from './rate-limit';

export const WRONG = 'That e-mail and password do not match an account.';

export type SignInResult =
	| { ok: true; userId: string }
	| { ok: false; status: 400 | 429; message: string; retryAfter?: number };

export async function checkCredentials(
	email: string,
	password: string,
	address: string
): Promise<SignInResult> {
	const wait = await retryAfter(email, address);
	if (wait > 0) {
		return { ok: false, status: 429, retryAfter: wait, message: tooMany(wait) };
	}
	const user = await User.findOne({ where: { email: email.toLowerCase() } });
	const hash = user?.active ? user.passwordHash : await dummyHash();
	const valid = await verifyPassword(hash, password);
	if (!user?.active || !valid) {
		await recordFailure(email, address);
		return { ok: false, status: 400, message: WRONG };
	}
	await clearAccount(email);
	return { ok: true, userId: user.id };
}

export function tooMany(seconds: number): string {
	const mins = Math.ceil(seconds / 60);
	return `Too many attempts. Try again in ${seconds < 90 ? `${seconds} seconds` : `${mins} minutes`}.`;
}
