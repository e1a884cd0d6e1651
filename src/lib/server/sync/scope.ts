/**
 * Who sees what in the pull (DESIGN §5), applied in SQL so the work follows the caller's
 * data, not the workshop's:
 *
 * - the jobs in scope (`seenJobs`): for technicians and apprentices the jobs assigned to them
 *   (`seesJob` in the rulebook, `src/lib/rules.ts`), for leads and owners every job of the
 *   workshop — in both cases only the open ones and those closed within the role's window
 *   (the workshop's `sync_settings`: `phone_days` for technicians and apprentices,
 *   `desk_days` for leads and owners; 30 days unless a lead changed them). Older jobs leave
 *   the phone; a lead fetches one on demand (`GET /api/sync/jobs/:id`).
 * - everything under those jobs (any record whose row carries `job_id`), their customers and
 *   vehicles, and the library: components, and sheets (technicians: approved ones only).
 * - rows of the feed with an `audience` (a reassigned job's `evict` and copies, written by
 *   `services/job-feed.ts`) reach that user alone.
 */
import { QueryTypes } from 'sequelize';
import type { SessionUser } from '../auth/types';
import { db } from '../db';
import { isLead } from '../../roles';

/** A row of the change feed, its record as the stored JSON text (the pull splices it in as it is). */
export type FeedRow = { seq: number; entity: string; entityId: string; version: number; op: 'upsert' | 'delete' | 'evict'; jobId: string | null; audience: string | null; record: string | null };

/** How many days a closed job stays on a phone: technicians' and apprentices', leads' and owners'. */
export type Windows = { phoneDays: number; deskDays: number };
export const DEFAULT_WINDOWS: Windows = { phoneDays: 30, deskDays: 30 };
/** The range a lead may set a window to, in days. */
export const WINDOW_DAYS = { min: 1, max: 365 } as const;

/** The workshop's windows (the defaults until a lead changes them). */
export async function windowsOf(workshopId: string): Promise<Windows> {
	const [row] = await db().query<{ phone_days: number; desk_days: number }>(
		'SELECT phone_days, desk_days FROM sync_settings WHERE workshop_id = ?',
		{ replacements: [workshopId], type: QueryTypes.SELECT }
	);
	return row ? { phoneDays: Number(row.phone_days), deskDays: Number(row.desk_days) } : { ...DEFAULT_WINDOWS };
}

/** Change the workshop's windows (the caller checked the role). */
export async function saveWindows(workshopId: string, userId: string, w: Windows): Promise<void> {
	await db().query(
		`INSERT INTO sync_settings (workshop_id, phone_days, desk_days, updated_by, updated_at) VALUES (?, ?, ?, ?, UTC_TIMESTAMP(3))
		 ON DUPLICATE KEY UPDATE phone_days = VALUES(phone_days), desk_days = VALUES(desk_days), updated_by = VALUES(updated_by), updated_at = VALUES(updated_at)`,
		{ replacements: [workshopId, w.phoneDays, w.deskDays, userId], type: QueryTypes.INSERT }
	);
}

/** The window that applies to this user, in days. */
export const windowDays = (user: SessionUser, w: Windows) => (isLead(user) ? w.deskDays : w.phoneDays);

/**
 * The SQL of the jobs this user's phone keeps: assigned ones for technicians and apprentices,
 * the workshop's for leads and owners; open, or closed within `days`. Read from
 * `jobs_workshop_assignee` / `jobs_window`.
 */
export function seenJobsSql(user: SessionUser, days: number): { sql: string; params: unknown[] } {
	const mine = isLead(user) ? '' : ' AND assignee_id = ?';
	return {
		sql: `SELECT id, customer_id, vehicle_id FROM jobs WHERE workshop_id = ?${mine} AND deleted_at IS NULL
		 AND (status <> 'closed' OR closed_at >= UTC_TIMESTAMP(3) - INTERVAL ? DAY)`,
		params: isLead(user) ? [user.workshopId, days] : [user.workshopId, user.id, days]
	};
}

export type Scope = {
	lead: boolean;
	userId: string;
	workshopId: string;
	days: number;
	jobs: string[];
	customers: string[];
	vehicles: string[];
};

/** The jobs in the user's scope with their customers and vehicles. */
export async function scopeOf(user: SessionUser, windows?: Windows): Promise<Scope> {
	const days = windowDays(user, windows ?? (await windowsOf(user.workshopId)));
	const q = seenJobsSql(user, days);
	const rows = await db().query<{ id: string; customer_id: string | null; vehicle_id: string | null }>(q.sql, {
		replacements: q.params,
		type: QueryTypes.SELECT
	});
	const uniq = (xs: (string | null)[]) => [...new Set(xs.filter((x): x is string => !!x))];
	return {
		lead: isLead(user),
		userId: user.id,
		workshopId: user.workshopId,
		days,
		jobs: rows.map((r) => r.id),
		customers: uniq(rows.map((r) => r.customer_id)),
		vehicles: uniq(rows.map((r) => r.vehicle_id))
	};
}

/** Entities of the workshop's library: every phone gets them (technicians: approved sheets only). */
export const LIBRARY = ['component', 'sheet'] as const;

/** Whether a feed row without a job reaches a technician or apprentice (library, their customers and vehicles). */
export function visibleWithoutJob(row: FeedRow, scope: Scope): boolean {
	if (row.entity === 'component') return true;
	if (row.entity === 'sheet') return !!row.record && (JSON.parse(row.record) as { state?: string }).state === 'approved';
	if (row.entity === 'customer') return scope.customers.includes(row.entityId);
	if (row.entity === 'vehicle') return scope.vehicles.includes(row.entityId);
	return false;
}
