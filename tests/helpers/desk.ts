/** A workshop for the lead's desk tests: one user per role signed in, a coil with an approved sheet. */
import { v7 as uuidv7 } from 'uuid';
import { expect } from 'vitest';
import { components, sheets } from '../../src/lib/server/services/components';
import { makeWorkshop, TEST_PASSWORD } from './fixtures';
import { Client } from './http';

let address = 0;
/** A client signed in from its own address (the sign-in throttle counts per address). */
export async function signedIn(base: string, email: string) {
	const c = new Client(base, `10.17.${Math.floor(++address / 200) + 1}.${(address % 200) + 1}`);
	const r = await c.signIn(email, TEST_PASSWORD);
	expect(r.status).toBe(303);
	return c;
}

/**
 * An invented coil's primary winding: cold spec (below 50 °C) 0.36–0.55 Ω, hot spec
 * (50–100 °C) 0.45–0.65 Ω — the usual shape of such a sheet (common practice), figures invented.
 */
export const PRIMARY = {
	key: 'primary',
	label: 'Primary winding',
	quantity: 'resistance',
	from: '1',
	to: '2',
	condition: 'key_off',
	unit: 'Ω',
	openOk: false,
	bands: [
		{ fromC: null, toC: 50, min: 0.36, max: 0.55 },
		{ fromC: 50, toC: 100, min: 0.45, max: 0.65 }
	]
};

/** A meter with a fine 200 Ω range and a coarse 20 kΩ one (invented accuracy figures). */
export const meter = (name: string, leadResistance = 0.1, relativeMode = false) => ({
	name,
	ranges: [
		{ label: '200 Ω', resolution: 0.01, pctOfReading: 0.5, counts: 2, maxReading: 199.99 },
		{ label: '20 kΩ', resolution: 10, pctOfReading: 0.8, counts: 3, maxReading: 19990 }
	],
	leadResistance,
	relativeMode
});

export async function deskWorkshop(base: string, label: string) {
	const ws = await makeWorkshop(label);
	const lead = ws.users.lead.actor;
	const partNumber = `${label.slice(0, 2).toUpperCase()}-${uuidv7().slice(-6)}`;
	const componentId = (await components.create(lead, { partNumber, kind: 'ignition_coil' }))
		.id as string;
	const draft = await sheets.create(lead, { componentId, checks: [PRIMARY] });
	const sheetId = draft.id as string;
	await sheets.update(
		lead,
		sheetId,
		draft.version as number,
		{},
		{ serverFields: { state: 'approved', approvedBy: lead.userId, approvedAt: new Date() } }
	);
	const as = {
		owner: await signedIn(base, ws.users.owner.email),
		lead: await signedIn(base, ws.users.lead.email),
		technician: await signedIn(base, ws.users.technician.email),
		apprentice: await signedIn(base, ws.users.apprentice.email)
	};
	return { ...ws, as, componentId, sheetId, partNumber };
}
