/** What a form action of the office pages answers (see src/lib/server/forms.ts). */
export type FormState = {
	action?: string;
	values?: Record<string, string>;
	fields?: Record<string, string>;
	conflict?: Record<string, unknown> & { version: number };
	message?: string;
	saved?: boolean;
};

/** The answer of the action named `action` (pages with several forms), or an empty one. */
export function formFor(form: unknown, action = 'default'): FormState {
	const f = (form ?? {}) as FormState;
	return (f.action ?? 'default') === action ? f : {};
}

/** A field compared in the "changed by someone else" notice. */
export type ConflictField = {
	key: string;
	label: string;
	/** A checkbox: shown as Yes / No. */
	bool?: boolean;
	/** A select: values shown by their labels. */
	options?: { value: string; label: string }[];
};
