import { z } from 'zod';

/** Optional free text: trimmed, '' becomes null, at most `max` characters. */
export const optionalText = (max: number) =>
	z
		.string()
		.trim()
		.max(max, `At most ${max} characters`)
		.transform((v) => (v === '' ? null : v))
		.nullable()
		.optional();

export const requiredText = (max: number, message: string) =>
	z.string().trim().min(1, message).max(max, `At most ${max} characters`);

export const uuidRef = z.uuid('Not a valid id');

/** Page number of a list (1-based). */
export const pageParam = z.coerce.number({ error: 'A page number' }).int().min(1).default(1);
/** Rows per page of a list: 1 to 100, `fallback` unless asked. */
export const pageSizeParam = (fallback = 25) =>
	z.coerce
		.number({ error: 'A number of rows' })
		.int()
		.min(1, 'At least 1')
		.max(100, 'At most 100')
		.default(fallback);
/** Free-text search of a list: trimmed, at most 100 characters, '' when absent. */
export const searchParam = z.string().trim().max(100, 'At most 100 characters').default('');

/** `field` or `-field` (descending) for each sortable field; `fallback` when absent. */
export function sortParam(keys: readonly string[], fallback: string) {
	const values = [...keys, ...keys.map((k) => `-${k}`)] as [string, ...string[]];
	return z
		.enum(values, { error: `Sort by ${keys.join(', ')} (a leading - for descending)` })
		.default(fallback);
}

/**
 * The query string of a list as a plain object: empty values are dropped so that
 * defaults apply (`?status=&page=` is the same as no status and no page).
 */
export function queryObject(params: URLSearchParams): Record<string, string> {
	return Object.fromEntries([...params].filter(([, v]) => v.trim() !== ''));
}

/** What every list answers: one page of items and the total that match. */
export type ListPage<T> = { items: T[]; total: number; page: number; pageSize: number };

/** The text of a form field ('' when missing or a file). */
export function formText(fd: FormData, name: string): string {
	const v = fd.get(name);
	return typeof v === 'string' ? v : '';
}

/** A whole number typed in a form: '' is null; spaces are dropped; other text is kept for zod to refuse. */
export function formNumber(fd: FormData, name: string): number | string | null {
	const raw = formText(fd, name).replace(/\s/g, '');
	if (raw === '') return null;
	return /^-?\d+$/.test(raw) ? Number(raw) : raw;
}

/** A checkbox: checked is true, absent is false. */
export function formBool(fd: FormData, name: string): boolean {
	const v = formText(fd, name);
	return v === 'on' || v === 'true' || v === '1';
}

/** A select of ids: '' is null. */
export function formRef(fd: FormData, name: string): string | null {
	const v = formText(fd, name).trim();
	return v === '' ? null : v;
}

/**
 * The patch schema of a record: every field optional and no defaults, so a patch changes
 * only the fields it sends (`.partial()` alone would fill `.default()`s in and overwrite
 * fields the caller never touched).
 */
export function patchOf<T extends z.ZodRawShape>(schema: z.ZodObject<T>) {
	const shape = Object.fromEntries(
		Object.entries(schema.shape).map(([k, s]) => [
			k,
			(s instanceof z.ZodDefault ? (s.unwrap() as z.ZodType) : (s as z.ZodType)).optional()
		])
	);
	return z.object(shape) as unknown as ReturnType<z.ZodObject<T>['partial']>;
}
