/**
 * Form actions answer like the API, in the shape the office pages read: the values typed
 * (so nothing is lost), the fields to fix (400), the current record when someone else
 * saved first (409), or a message (403, 404). `action` names the form that answered, for
 * pages with several forms.
 */
import { fail } from '@sveltejs/kit';
import { AppError, StaleVersionError, ValidationError } from './errors';

export type FormValues = Record<string, string>;

/** The text values of a submitted form (files are ignored). */
export function valuesOf(fd: FormData): FormValues {
	const out: FormValues = {};
	for (const [k, v] of fd) if (typeof v === 'string') out[k] = v;
	return out;
}

/** Turn a service error into the action's failure; anything unexpected is rethrown. */
export function failFrom(e: unknown, values: FormValues, action = 'default') {
	if (e instanceof ValidationError) return fail(400, { action, values, fields: e.fields });
	if (e instanceof StaleVersionError) return fail(409, { action, values, conflict: e.current });
	if (e instanceof AppError) return fail(e.status, { action, values, message: e.message });
	throw e;
}

/** The version a form was opened at (the hidden `baseVersion` input); 0 when missing. */
export function baseVersionOf(fd: FormData): number {
	const n = Number(fd.get('baseVersion'));
	return Number.isInteger(n) && n > 0 ? n : 0;
}
