import { guardPage, LEADS } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { User } from '$lib/server/db/models';
import { listDue } from '$lib/server/services/signoffs';
import { positionsText } from '$lib/tests/facts';
import { KINDS, type CircuitKind } from '$lib/flow/circuit';

/** The apprentices' finished tests waiting for a lead, and those sent back (leads and owners). */
export async function load(event) {
	const actor = actorOf(guardPage(event, LEADS));
	const [due, users] = await Promise.all([
		listDue(actor),
		User.findAll({ where: { workshopId: actor.workshopId }, attributes: ['id', 'name'] })
	]);
	const names = new Map(users.map((u) => [u.id, u.name]));
	const items = due.map((d) => ({
		...d,
		/** What was tested, in words: the part number, or the circuit test's title. */
		what: d.circuitKind
			? (KINDS[d.circuitKind as CircuitKind]?.title ?? 'Circuit test')
			: (d.partNumber ?? 'Part not named'),
		anchor: d.circuitKind ? `circuit-${d.id}` : `test-${d.id}`,
		where: positionsText(d.positions),
		by: (d.technicianId && names.get(d.technicianId)) || 'Someone no longer in the workshop'
	}));
	return {
		title: 'Sign-offs',
		waiting: items.filter((d) => d.due === 'lead'),
		sentBack: items.filter((d) => d.due === 'apprentice')
	};
}
