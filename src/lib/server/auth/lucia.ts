/**
 * lucia v3 sessions stored in MariaDB through a Sequelize-backed adapter (its seven methods).
 * Session ids are lucia's random secrets (not UUIDv7).
 *
 * Timeouts (OWASP ASVS 5.0 §7.3; the reasons are in docs/proofs.md):
 *  - inactivity, `SESSION_IDLE_DAYS`: a session lasts that long from its last renewal; lucia
 *    renews one used in the second half of that time (`session.fresh`), so a session unused
 *    for between half of it and all of it has ended;
 *  - absolute, `SESSION_MAX_DAYS` from sign-in, however much it is used: the adapter never
 *    reports nor stores an expiry past it, so lucia ends the session then.
 */
import { Lucia, TimeSpan, type Adapter, type DatabaseSession, type DatabaseUser } from 'lucia';
import { Op, QueryTypes } from 'sequelize';
import { db } from '../db';
import { Session } from '../db/models';
import type { SessionUser } from './types';

/** A session ends after this many days without use (see above). */
export const SESSION_IDLE_DAYS = 7;
/** A session ends this many days after sign-in, used or not. */
export const SESSION_MAX_DAYS = 30;
const MAX_MS = SESSION_MAX_DAYS * 86_400_000;

/** The session's expiry, never past its absolute end. */
const cappedExpiry = (expiresAt: Date, createdAt: Date) =>
	new Date(Math.min(expiresAt.getTime(), createdAt.getTime() + MAX_MS));

const toDbSession = (s: Session): DatabaseSession => ({
	id: s.id,
	userId: s.userId,
	expiresAt: cappedExpiry(new Date(s.expiresAt), new Date(s.createdAt)),
	attributes: {}
});

type SessionRow = {
	id: string;
	user_id: string;
	expires_at: string;
	uid: string | null;
	active: number | boolean | null;
	workshop_id: string | null;
	email: string | null;
	name: string | null;
	role: string | null;
	workshop_name: string | null;
	time_zone: string | null;
};

export const sessionAdapter: Adapter = {
	/** One query per request (every API call reads its session): session, user and workshop. */
	async getSessionAndUser(sessionId) {
		const [row] = await db().query<SessionRow>(
			`SELECT s.id, s.user_id,
			        DATE_FORMAT(LEAST(s.expires_at, s.created_at + INTERVAL ${SESSION_MAX_DAYS} DAY), '%Y-%m-%dT%H:%i:%s.%fZ') AS expires_at,
			        u.id AS uid, u.active, u.workshop_id, u.email, u.name, u.role, w.name AS workshop_name, w.time_zone
			 FROM sessions s LEFT JOIN users u ON u.id = s.user_id LEFT JOIN workshops w ON w.id = u.workshop_id
			 WHERE s.id = ?`,
			{ replacements: [sessionId], type: QueryTypes.SELECT }
		);
		if (!row) return [null, null];
		const session: DatabaseSession = {
			id: row.id,
			userId: row.user_id,
			expiresAt: new Date(row.expires_at), // stored in UTC (the connections' time zone)
			attributes: {}
		};
		if (!row.uid || !Number(row.active)) return [session, null];
		const user: DatabaseUser = {
			id: row.uid,
			attributes: {
				workshopId: row.workshop_id!,
				workshopName: row.workshop_name ?? '',
				timeZone: row.time_zone ?? 'UTC',
				email: row.email!,
				name: row.name!,
				role: row.role as SessionUser['role']
			}
		};
		return [session, user];
	},
	async getUserSessions(userId) {
		return (await Session.findAll({ where: { userId } })).map(toDbSession);
	},
	async setSession(session) {
		await Session.create({
			id: session.id,
			userId: session.userId as string,
			expiresAt: session.expiresAt
		});
	},
	async updateSessionExpiration(sessionId, expiresAt) {
		// Never past the absolute end (sign-in + SESSION_MAX_DAYS).
		await db().query(
			`UPDATE sessions SET expires_at = LEAST(?, created_at + INTERVAL ${SESSION_MAX_DAYS} DAY) WHERE id = ?`,
			{ replacements: [expiresAt, sessionId], type: QueryTypes.UPDATE }
		);
	},
	async deleteSession(sessionId) {
		await Session.destroy({ where: { id: sessionId } });
	},
	async deleteUserSessions(userId) {
		await Session.destroy({ where: { userId } });
	},
	async deleteExpiredSessions() {
		await Session.destroy({ where: { expiresAt: { [Op.lte]: new Date() } } });
	}
};

export const lucia = new Lucia(sessionAdapter, {
	sessionExpiresIn: new TimeSpan(SESSION_IDLE_DAYS, 'd'),
	sessionCookie: { name: 'fb_session', attributes: { sameSite: 'lax', path: '/' } },
	getUserAttributes: (a): Omit<SessionUser, 'id'> => ({
		workshopId: a.workshopId,
		workshopName: a.workshopName,
		timeZone: a.timeZone,
		email: a.email,
		name: a.name,
		role: a.role
	})
});

declare module 'lucia' {
	interface Register {
		Lucia: typeof lucia;
		UserId: string;
		DatabaseUserAttributes: Omit<SessionUser, 'id'>;
	}
}
