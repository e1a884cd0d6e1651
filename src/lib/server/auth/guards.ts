/**
 * Guards used in group layouts AND again in every action and API handler (a layout does
 * not guard actions). The workshop always comes from the session.
 */
import { error, redirect, type RequestEvent } from '@sveltejs/kit';
import type { Role } from '../db/models';
import { AppError } from '../errors';
import type { SessionUser } from './types';

export const LEADS: Role[] = ['lead', 'owner'];

/** API: the signed-in user, or a 401 AppError. */
export function requireUser(locals: App.Locals): SessionUser {
	if (!locals.user) throw new AppError(401, 'signed_out', 'Sign in to continue');
	return locals.user;
}

/** API: the signed-in user holding one of `roles`, or 401 / 403. */
export function requireRole(locals: App.Locals, roles: readonly Role[]): SessionUser {
	const user = requireUser(locals);
	if (!roles.includes(user.role))
		throw new AppError(403, 'forbidden', 'Your role does not allow this');
	return user;
}

/** Pages and actions: redirect a signed-out visitor to sign-in; 403 for a missing role. */
export function guardPage(
	event: Pick<RequestEvent, 'locals' | 'url'>,
	roles?: readonly Role[]
): SessionUser {
	const user = event.locals.user;
	if (!user) {
		const next = event.url.pathname + event.url.search;
		redirect(303, `/sign-in?next=${encodeURIComponent(next)}`);
	}
	if (roles && !roles.includes(user.role))
		error(403, { message: 'This page is for workshop leads and owners.', code: 'forbidden' });
	return user;
}
