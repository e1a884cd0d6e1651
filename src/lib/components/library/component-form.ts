/**
 * The component form's state as typed (years and cylinders as text), turned into the API's
 * input and checked with the shared zod schema, so the form shows the server's messages.
 */
import {
	componentCreate,
	type Caution,
	type ComponentKind,
	type ComponentRecord
} from '$lib/schemas/component';

export type FitForm = {
	uid: number;
	make: string;
	model: string;
	yearFrom: string;
	yearTo: string;
	engineCode: string;
};
export type PositionForm = { uid: number; position: string; cylinders: string };
export type ComponentForm = {
	partNumber: string;
	kind: ComponentKind;
	description: string;
	cautions: Caution[];
	fitment: FitForm[];
	positions: PositionForm[];
};

let uid = 0;
export const newFit = (): FitForm => ({
	uid: ++uid,
	make: '',
	model: '',
	yearFrom: '',
	yearTo: '',
	engineCode: ''
});
export const newPosition = (): PositionForm => ({ uid: ++uid, position: '', cylinders: '' });

export function formFromComponent(c?: ComponentRecord | null): ComponentForm {
	return {
		partNumber: c?.partNumber ?? '',
		kind: c?.kind ?? 'ignition_coil',
		description: c?.description ?? '',
		cautions: [...(c?.cautions ?? [])],
		fitment: (c?.fitment ?? []).map((f) => ({
			uid: ++uid,
			make: f.make,
			model: f.model,
			yearFrom: f.yearFrom == null ? '' : String(f.yearFrom),
			yearTo: f.yearTo == null ? '' : String(f.yearTo),
			engineCode: f.engineCode ?? ''
		})),
		positions: (c?.positions ?? []).map((p) => ({
			uid: ++uid,
			position: p.position,
			cylinders: p.cylinders.join(' ')
		}))
	};
}

export function inputFromComponentForm(form: ComponentForm) {
	const errors: Record<string, string> = {};
	const year = (text: string, path: string) => {
		const t = text.trim();
		if (t === '') return null;
		if (!/^\d{4}$/.test(t)) errors[path] = 'A year like 2019';
		return Number(t);
	};
	const input = {
		partNumber: form.partNumber,
		kind: form.kind,
		description: form.description,
		cautions: form.cautions,
		fitment: form.fitment.map((f, i) => ({
			make: f.make,
			model: f.model,
			yearFrom: year(f.yearFrom, `fitment.${i}.yearFrom`),
			yearTo: year(f.yearTo, `fitment.${i}.yearTo`),
			engineCode: f.engineCode
		})),
		positions: form.positions.map((p, i) => {
			const list = p.cylinders.split(/[\s,+/&]+/).filter(Boolean);
			if (list.some((x) => !/^\d{1,2}$/.test(x)))
				errors[`positions.${i}.cylinders`] = 'Cylinder numbers like 1 4';
			return { position: p.position, cylinders: list.map(Number) };
		})
	};
	return { input, errors };
}

/** Every problem of the form by field path, first message each. */
export function validateComponentForm(form: ComponentForm): Record<string, string> {
	const { input, errors } = inputFromComponentForm(form);
	const r = componentCreate.safeParse(input);
	if (!r.success)
		for (const issue of r.error.issues) errors[issue.path.join('.') || '_'] ??= issue.message;
	return errors;
}
