/**
 * Typed errors thrown by services and turned into the one error body of the API
 * (`{ error: { code, message, fields? } }`) by `toErrorResponse`.
 */
import type { ZodError } from 'zod';

export class AppError extends Error {
	constructor(
		readonly status: number,
		readonly code: string,
		message: string,
		readonly extra: Record<string, unknown> = {}
	) {
		super(message);
	}
}

/** 400 with per-field messages (`fields` maps a dotted path to its first message). */
export class ValidationError extends AppError {
	constructor(
		readonly fields: Record<string, string>,
		message = 'Some fields need attention'
	) {
		super(400, 'invalid', message, { fields });
	}
	static fromZod(err: ZodError, prefix = ''): ValidationError {
		const fields: Record<string, string> = {};
		for (const issue of err.issues) {
			const key = prefix + (issue.path.join('.') || '_');
			fields[key] ??= issue.message;
		}
		return new ValidationError(fields);
	}
}

export class NotFoundError extends AppError {
	constructor(what = 'Record') {
		super(404, 'not_found', `${what} not found`);
	}
}

/**
 * A refusal of the rulebook: 403 with the reason in the product's words. Sync answers every
 * one of them `rejected: forbidden` with the same words.
 */
export class ForbiddenError extends AppError {
	constructor(
		message = 'Your role does not allow this',
		status = 403,
		code = 'forbidden',
		extra: Record<string, unknown> = {}
	) {
		super(status, code, message, extra);
	}
}

/**
 * An approved spec sheet never changes (a refusal of the rulebook): 409 `sheet_approved`
 * carrying the approved record, so the client can start the next draft from it.
 */
export class SheetApprovedError extends ForbiddenError {
	constructor(current: { sheetVersion?: unknown }) {
		super(
			`Version ${current.sheetVersion} is approved and never changes; start the next draft`,
			409,
			'sheet_approved',
			{ current }
		);
	}
}

/** 409: the record changed since the version the caller saw; carries the current record. */
export class StaleVersionError extends AppError {
	constructor(readonly current: Record<string, unknown>) {
		super(409, 'stale_version', 'Changed by someone else since you opened it', { current });
	}
}

export class IdConflictError extends AppError {
	constructor() {
		super(409, 'id_conflict', 'A different record already has this id');
	}
}

/** The JSON body for an error (DESIGN §5). */
export function errorBody(code: string, message: string, extra: Record<string, unknown> = {}) {
	return { error: { code, message, ...extra } };
}

export function toErrorResponse(err: unknown): Response {
	if (err instanceof AppError) {
		return Response.json(errorBody(err.code, err.message, err.extra), { status: err.status });
	}
	console.error(err);
	return Response.json(errorBody('server_error', 'Something went wrong on the server'), {
		status: 500
	});
}
