import type { Role } from '../../roles';

/** The signed-in user as kept in `event.locals` (no secrets). */
export type SessionUser = {
	id: string;
	workshopId: string;
	workshopName: string;
	/** The workshop's IANA time zone (office pages, reports and mails show times in it); absent means UTC. */
	timeZone?: string;
	email: string;
	name: string;
	role: Role;
};

/** Who performs a write: the workshop always comes from the session, never from the request. */
export type Actor = {
	userId: string;
	workshopId: string;
	role: Role;
	deviceId?: string | null;
	deviceTime?: Date | null;
};

export function actorOf(user: SessionUser, deviceId: string | null = 'web'): Actor {
	return { userId: user.id, workshopId: user.workshopId, role: user.role, deviceId };
}

export { isLead } from '../../roles';
