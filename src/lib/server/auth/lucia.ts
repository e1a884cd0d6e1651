/**
 * lucia v3 sessions stored in MariaDB through a Sequelize-backed adapter (its seven methods).
 * Session ids are lucia's random secrets (not UUIDv7). Sessions last 30 days and slide:
 * lucia extends one that is used in its second half (`session.fresh`).
 */
import { Lucia, TimeSpan, type Adapter, type DatabaseSession, type DatabaseUser } from 'lucia';
import { Op } from 'sequelize';
import { Session, User, Workshop } from '../db/models';
import type { SessionUser } from './types';

const toDbSession = (s: Session): DatabaseSession => ({
	id: s.id,
	userId: s.userId,
	expiresAt: new Date(s.expiresAt),
	attributes: {}
});

export const sessionAdapter: Adapter = {
	async getSessionAndUser(sessionId) {
		const s = await Session.findByPk(sessionId);
		if (!s) return [null, null];
		const u = await User.findByPk(s.userId);
		if (!u || !u.active) return [toDbSession(s), null];
		const w = await Workshop.findByPk(u.workshopId);
		const user: DatabaseUser = {
			id: u.id,
			attributes: {
				workshopId: u.workshopId,
				workshopName: w?.name ?? '',
				email: u.email,
				name: u.name,
				role: u.role
			}
		};
		return [toDbSession(s), user];
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
		await Session.update({ expiresAt }, { where: { id: sessionId } });
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
	sessionExpiresIn: new TimeSpan(30, 'd'),
	sessionCookie: { name: 'fb_session', attributes: { sameSite: 'lax', path: '/' } },
	getUserAttributes: (a): Omit<SessionUser, 'id'> => ({
		workshopId: a.workshopId,
		workshopName: a.workshopName,
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
