import { api } from '$lib/server/api';
import { AppError, errorBody, ValidationError } from '$lib/server/errors';
import { pushOps } from '$lib/server/sync/push';
import { quickPushBody } from '$lib/server/sync/quick-parse';
import { describeFirstIssue, hasTooManyOps, MAX_BODY_BYTES, MAX_OPS, pushBodySchema } from '$lib/sync/protocol';

const tooLarge = (why: string) => new AppError(413, 'too_large', why);

/**
 * POST /api/sync/push — signed in (401) → size: over 1 MiB or 1,000 ops (413, before the
 * schema) → schema (400 naming the first bad op and field; nothing applied) → the ops.
 */
export const POST = api(async ({ request }, user) => {
	const declared = Number(request.headers.get('content-length') ?? 0);
	if (declared > MAX_BODY_BYTES) {
		// Answer before reading the body; close the connection so it is not reused mid-body.
		return Response.json(errorBody('too_large', `At most ${MAX_BODY_BYTES} bytes per push`), {
			status: 413,
			headers: { connection: 'close' }
		});
	}
	const bytes = new Uint8Array(await request.arrayBuffer());
	if (bytes.byteLength > MAX_BODY_BYTES) throw tooLarge(`At most ${MAX_BODY_BYTES} bytes per push`);
	let body: unknown;
	try {
		body = JSON.parse(new TextDecoder().decode(bytes));
	} catch {
		throw new ValidationError({ _: 'The body is not valid JSON' }, 'Malformed JSON');
	}
	if (hasTooManyOps(body)) throw tooLarge(`At most ${MAX_OPS} ops per push`);
	// A plainly valid body skips zod (same output, see quick-parse.ts); zod judges the rest.
	let push = quickPushBody(body);
	if (!push) {
		const parsed = pushBodySchema.safeParse(body);
		if (!parsed.success) {
			const { field, message } = describeFirstIssue(parsed.error);
			throw new ValidationError({ [field]: message }, `Invalid push: ${field}: ${message}`);
		}
		push = parsed.data;
	}
	return { results: await pushOps(user, push) };
});
