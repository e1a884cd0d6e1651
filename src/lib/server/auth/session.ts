/** Session cookie handling for SvelteKit: explicit attributes, `secure` from the request. */
import type { Cookies } from '@sveltejs/kit';
import { lucia } from './lucia';
import type { SessionUser } from './types';

function cookieOptions(url: URL, expires?: Date) {
	return {
		path: '/',
		httpOnly: true,
		sameSite: 'lax' as const,
		secure: url.protocol === 'https:',
		...(expires ? { expires } : { maxAge: 0 })
	};
}

/** Start a fresh session (a new random id) and set its cookie. */
export async function startSession(userId: string, cookies: Cookies, url: URL) {
	const session = await lucia.createSession(userId, {});
	cookies.set(lucia.sessionCookieName, session.id, cookieOptions(url, session.expiresAt));
	return session;
}

/** Validate the cookie's session; slides its expiry; clears a dead cookie. */
export async function readSession(
	cookies: Cookies,
	url: URL
): Promise<{ user: SessionUser | null; sessionId: string | null }> {
	const id = cookies.get(lucia.sessionCookieName);
	if (!id) return { user: null, sessionId: null };
	const { session, user } = await lucia.validateSession(id);
	if (!session) {
		cookies.set(lucia.sessionCookieName, '', cookieOptions(url));
		return { user: null, sessionId: null };
	}
	if (session.fresh)
		cookies.set(lucia.sessionCookieName, session.id, cookieOptions(url, session.expiresAt));
	return { user: user as SessionUser, sessionId: session.id };
}

/** End the session in the database and clear the cookie. */
export async function endSession(sessionId: string, cookies: Cookies, url: URL) {
	await lucia.invalidateSession(sessionId);
	cookies.set(lucia.sessionCookieName, '', cookieOptions(url));
}
