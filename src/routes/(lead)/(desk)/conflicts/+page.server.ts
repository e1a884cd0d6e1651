import { fail } from '@sveltejs/kit';
import { settleForm, settleInputOf } from '$lib/conflicts/form';
import { fieldWord } from '$lib/conflicts/words';
import { guardPage, LEADS } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { ValidationError } from '$lib/server/errors';
import { failFrom, valuesOf } from '$lib/server/forms';
import { conflictField, listInbox, listSettled } from '$lib/server/sync/clash-inbox';
import { settle } from '$lib/server/sync/conflicts';

export async function load(event) {
	const actor = actorOf(guardPage(event, LEADS));
	const [open, settled] = await Promise.all([listInbox(actor), listSettled(actor)]);
	return { title: 'Clashes', open, settled };
}

/** Settle one clash: guard → parse → the same service as POST /api/conflicts/:id. */
export const actions = {
	settle: async (event) => {
		const actor = actorOf(guardPage(event, LEADS));
		const fd = await event.request.formData();
		const values = valuesOf(fd);
		const parsed = settleForm.safeParse(values);
		if (!parsed.success) return failFrom(ValidationError.fromZod(parsed.error), values, 'settle');
		try {
			const at = await conflictField(actor, parsed.data.conflictId);
			await settle(
				actor,
				parsed.data.conflictId,
				settleInputOf(parsed.data, fieldWord(at.entity, at.field).kind)
			);
		} catch (e) {
			// The record's own rules name its field (e.g. `status`): show that message at the value.
			if (e instanceof ValidationError && !('choice' in e.fields) && !('_' in e.fields)) {
				return fail(400, {
					action: 'settle',
					values,
					fields: { value: Object.values(e.fields)[0] }
				});
			}
			return failFrom(e, values, 'settle');
		}
		return { action: 'settle', settled: parsed.data.conflictId };
	}
};
