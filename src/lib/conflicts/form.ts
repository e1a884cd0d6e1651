/** The inbox's settle form: what the lead chose, turned into the settle service's input. */
import { z } from 'zod';
import { typedValue, type FieldKind } from './words';

export const settleForm = z.object({
	conflictId: z.uuid('This clash is not known'),
	choice: z
		.string({ error: 'Pick the value to keep' })
		.regex(/^(stored|own|phone:.{1,64})$/, 'Pick the value to keep'),
	value: z.string().max(5000, 'At most 5000 characters').default(''),
	note: z.string().trim().max(500, 'At most 500 characters').default('')
});
export type SettleForm = z.output<typeof settleForm>;

/** The settle input for a parsed form, with the lead's own value typed for the field. */
export function settleInputOf(f: SettleForm, kind: FieldKind) {
	const note = f.note || undefined;
	if (f.choice === 'stored') return { pick: 'server' as const, note };
	if (f.choice === 'own') return { pick: 'value' as const, value: typedValue(kind, f.value), note };
	return { pick: 'candidate' as const, deviceId: f.choice.slice('phone:'.length), note };
}
