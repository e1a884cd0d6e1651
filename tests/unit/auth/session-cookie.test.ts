/** The session cookie's name and attributes by protocol (OWASP ASVS 5.0 §3.3). */
import { describe, expect, it } from 'vitest';
import { sessionCookieName, sessionCookieOptions } from '../../../src/lib/server/auth/session';

describe('the session cookie', () => {
	it('3.3.1, 3.3.3: over https it is Secure and carries the __Host- prefix (host-only, path /)', () => {
		const url = new URL('https://workshop.example/sign-in');
		const expires = new Date(Date.now() + 86_400_000);
		expect(sessionCookieName(url)).toBe('__Host-fb_session');
		expect(sessionCookieOptions(url, expires)).toEqual({ path: '/', httpOnly: true, sameSite: 'lax', secure: true, expires });
	});

	it('over plain http (the app on loopback) it can be neither, and keeps the other attributes', () => {
		const url = new URL('http://127.0.0.1:4173/sign-in');
		expect(sessionCookieName(url)).toBe('fb_session');
		expect(sessionCookieOptions(url)).toEqual({ path: '/', httpOnly: true, sameSite: 'lax', secure: false, maxAge: 0 });
	});
});
