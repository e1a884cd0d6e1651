/** Helpers for the API tests: signed-in clients, the two-workshop set-up, creates and error checks. */
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

const clients = new Map<string, Promise<Client>>();
/** The one client signed in as `role` of `ws`, made at first use and reused after. */
export function clientOf(ws: Workshop, role: Role): Promise<Client> {
	const key = `${ws.workshop.id}:${role}`;
	if (!clients.has(key)) clients.set(key, signedIn(ws, role));
	return clients.get(key)!;
}

/**
 * Workshop "<label> A" with every role signed in, and workshop "<label> B", whose records
 * the tests expect A's users never to see.
 */
export async function twoWorkshops(label: string) {
	const a = await makeWorkshop(`${label} A`);
	const b = await makeWorkshop(`${label} B`);
	return { a, b, as: await signInAll(a) };
}

/** POST `body` to `path` as JSON, assert 201 (the answer is the message) and return the answer. */
export async function postCreated(c: Client, path: string, body: Record<string, unknown>) {
	const r = await c.json('POST', path, body);
	const text = await r.text();
	expect(r.status, text).toBe(201);
	return JSON.parse(text);
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

/**
 * The lead and then the technician change `/api/<resource>/<id>`, both from version 1: the
 * lead's change is saved as version 2 and the technician's is refused with 409 and the
 * current record, which carries the lead's change. Returns the error.
 */
export async function expectStaleRefused(
	as: Record<Role, Client>,
	resource: string,
	id: string,
	saved: Record<string, unknown>,
	refused: Record<string, unknown>
) {
	const path = `/api/${resource}/${id}`;
	await as.lead.json('PATCH', path, { baseVersion: 1, ...saved });
	const r = await as.technician.json('PATCH', path, { baseVersion: 1, ...refused });
	const e = await expectError(r, 409, 'stale_version');
	expect(e.current).toMatchObject({ id, version: 2, ...saved });
	return e;
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
