/** Helpers for the jobs, customers and vehicles API tests: signed-in clients and error checks. */
import { expect, inject } from 'vitest';
import { Client } from './http';
import { makeWorkshop, TEST_PASSWORD } from './fixtures';

export type Workshop = Awaited<ReturnType<typeof makeWorkshop>>;
export type Role = 'owner' | 'lead' | 'technician' | 'apprentice';

let address = 10;
/** A client signed in as `role` of `ws` (each from its own address, clear of the sign-in throttle). */
export async function signedIn(ws: Workshop, role: Role): Promise<Client> {
	const c = new Client(
		inject('baseURL'),
		`10.7.${Math.floor(address / 250)}.${(address++ % 250) + 1}`
	);
	const r = await c.signIn(ws.users[role].email, TEST_PASSWORD);
	expect(r.status, `sign-in as ${role}`).toBe(303);
	return c;
}

/** Every role of a workshop, signed in. */
export async function signInAll(ws: Workshop): Promise<Record<Role, Client>> {
	const out = {} as Record<Role, Client>;
	for (const role of ['owner', 'lead', 'technician', 'apprentice'] as const)
		out[role] = await signedIn(ws, role);
	return out;
}

/** Assert the one error body (DESIGN §5) with this status and code; returns the error. */
export async function expectError(r: Response, status: number, code: string) {
	const body = await r.json();
	expect(r.status, JSON.stringify(body)).toBe(status);
	expect(body.error.code).toBe(code);
	expect(typeof body.error.message).toBe('string');
	return body.error as {
		code: string;
		message: string;
		fields?: Record<string, string>;
		current?: Record<string, unknown>;
	};
}

/** Assert a 400 naming `field` among the invalid fields. */
export async function expectInvalid(r: Response, field: string) {
	const e = await expectError(r, 400, 'invalid');
	expect(Object.keys(e.fields ?? {})).toContain(field);
	return e;
}

/** A tag unique to this run, for names and complaints the tests search for. */
export const tag = (label: string) =>
	`${label}-${Date.now().toString(36)}${Math.random().toString(36).slice(2, 6)}`;
