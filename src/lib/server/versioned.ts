/**
 * The body of a versioned change (`PATCH`, status change): `baseVersion` — the version the
 * caller saw — next to the fields. A missing or bad `baseVersion` is a 400 naming it.
 */
import { z } from 'zod';
import { NotFoundError, ValidationError } from './errors';

const baseVersion = z.number({ error: 'The version you saw (a whole number)' }).int().min(1);

/** Split `{ baseVersion, ...fields }`; 400 when the body is not an object or lacks the version. */
export function splitBaseVersion(body: unknown): {
	baseVersion: number;
	fields: Record<string, unknown>;
} {
	if (!body || typeof body !== 'object' || Array.isArray(body))
		throw new ValidationError({ _: 'Send a JSON object' });
	const { baseVersion: v, ...fields } = body as Record<string, unknown>;
	const r = baseVersion.safeParse(v);
	if (!r.success) throw new ValidationError({ baseVersion: r.error.issues[0].message });
	return { baseVersion: r.data, fields };
}

/** A JSON object body (400 otherwise), with `jobId` taken out for the create routes. */
export function splitJobId(body: unknown): { jobId: unknown; fields: Record<string, unknown> } {
	if (!body || typeof body !== 'object' || Array.isArray(body))
		throw new ValidationError({ _: 'Send a JSON object' });
	const { jobId, ...fields } = body as Record<string, unknown>;
	return { jobId, fields };
}

/** The `:id` of a route: 404 (as `what`) unless it is a UUID. */
export function idParam(id: string | undefined, what: string): string {
	if (!id || !z.uuid().safeParse(id).success) throw new NotFoundError(what);
	return id.toLowerCase();
}
