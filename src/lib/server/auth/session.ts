/**
 * The session cookie for SvelteKit (OWASP ASVS 5.0 §3.3): HttpOnly, SameSite=Lax, path `/`,
 * no Domain, an explicit expiry; over https it is `Secure` and named with the `__Host-`
 * prefix (which the browser accepts only from a secure origin, for this host and path `/`).
 * Over plain http — the app on loopback during development — it can be neither.
 */
import type { Cookies } from '@sveltejs/kit';
import { lucia } from './lucia';
import type { SessionUser } from './types';

/** The cookie's name at this address. */
export function sessionCookieName(url: URL): string {
	return url.protocol === 'https:' ? `__Host-${lucia.sessionCookieName}` : lucia.sessionCookieName;
}

/** The cookie's attributes at this address; no `expires` clears it. */
export function sessionCookieOptions(url: URL, expires?: Date) {
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
	cookies.set(sessionCookieName(url), session.id, sessionCookieOptions(url, session.expiresAt));
	return session;
}

/** Validate the cookie's session; slides its expiry; clears a dead cookie. */
export async function readSession(
	cookies: Cookies,
	url: URL
): Promise<{ user: SessionUser | null; sessionId: string | null }> {
	const name = sessionCookieName(url);
	const id = cookies.get(name);
	if (!id) return { user: null, sessionId: null };
	const { session, user } = await lucia.validateSession(id);
	if (!session) {
		cookies.set(name, '', sessionCookieOptions(url));
		return { user: null, sessionId: null };
	}
	if (session.fresh) cookies.set(name, session.id, sessionCookieOptions(url, session.expiresAt));
	return { user: user as SessionUser, sessionId: session.id };
}

/** End the session in the database and clear the cookie. */
export async function endSession(sessionId: string, cookies: Cookies, url: URL) {
	await lucia.invalidateSession(sessionId);
	cookies.set(sessionCookieName(url), '', sessionCookieOptions(url));
}

/** End every session of a user (sign-out, a new password) and clear this browser's cookie. */
export async function endEverySession(userId: string, cookies: Cookies, url: URL) {
	await lucia.invalidateUserSessions(userId);
	cookies.set(sessionCookieName(url), '', sessionCookieOptions(url));
}
