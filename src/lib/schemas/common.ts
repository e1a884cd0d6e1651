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
