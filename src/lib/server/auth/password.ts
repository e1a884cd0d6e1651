/**
 * Password hashing with argon2id at the OWASP Password Storage Cheat Sheet minimum
 * (19 MiB memory, 2 iterations, 1 lane).
 */
import { hash, verify } from '@node-rs/argon2';

export const ARGON2_OPTIONS = {
	algorithm: 2, // Algorithm.Argon2id (a const enum, so spelled out here)
	memoryCost: 19456,
	timeCost: 2,
	parallelism: 1,
	outputLen: 32
} as const;

export function hashPassword(password: string): Promise<string> {
	return hash(password, ARGON2_OPTIONS);
}

export async function verifyPassword(stored: string, password: string): Promise<boolean> {
	try {
		return await verify(stored, password);
	} catch {
		return false;
	}
}

let dummy: Promise<string> | null = null;
/** A hash to verify against when the e-mail is unknown, so both failures take as long. */
export function dummyHash(): Promise<string> {
	dummy ??= hashPassword('not-a-real-password-' + Math.random());
	return dummy;
}
