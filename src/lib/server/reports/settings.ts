/**
 * The workshop's report settings (`report_settings`): the details printed on every report,
 * the paper size, how many days a report link stays open (30 unless changed) and whether
 * technicians may send reports. A workshop without a row has the defaults.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import { reportSettingsInput } from '../../schemas/report';
import type { Paper } from '../../report/types';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { writeAudit } from '../db/feed';
import { Workshop } from '../db/models';
import { ForbiddenError, StaleVersionError, ValidationError } from '../errors';
import { mayChangeReportSettings } from './rules';

export type ReportSettings = {
	workshopName: string;
	/** The workshop's IANA time zone (the report's day and times are its local time). */
	timeZone: string;
	address: string | null;
	phone: string | null;
	email: string | null;
	paper: Paper;
	linkDays: number;
	techniciansSend: boolean;
	version: number;
};

export const DEFAULT_LINK_DAYS = 30;

export async function readReportSettings(workshopId: string, t?: Transaction): Promise<ReportSettings> {
	const [row] = await db().query<Record<string, unknown>>(
		`SELECT address, phone, email, paper, link_days, technicians_send, version FROM report_settings WHERE workshop_id = ?`,
		{ replacements: [workshopId], type: QueryTypes.SELECT, transaction: t }
	);
	const w = await Workshop.findByPk(workshopId, { transaction: t });
	return {
		workshopName: w?.name ?? '',
		timeZone: w?.timeZone ?? 'UTC',
		address: (row?.address as string | null) ?? null,
		phone: (row?.phone as string | null) ?? null,
		email: (row?.email as string | null) ?? null,
		paper: ((row?.paper as Paper | undefined) ?? 'a4') as Paper,
		linkDays: Number(row?.link_days ?? DEFAULT_LINK_DAYS),
		techniciansSend: Boolean(Number(row?.technicians_send ?? 0)),
		version: Number(row?.version ?? 0)
	};
}

const COLUMNS = {
	address: 'address',
	phone: 'phone',
	email: 'email',
	paper: 'paper',
	linkDays: 'link_days',
	techniciansSend: 'technicians_send'
} as const;

/**
 * Change the settings (leads and owners), from the version the form was opened at (409 when
 * someone saved since); one audit row per changed field.
 */
export async function saveReportSettings(actor: Actor, baseVersion: number, input: unknown): Promise<ReportSettings> {
	if (!mayChangeReportSettings(actor)) throw new ForbiddenError('Only a workshop lead changes the report settings');
	const r = reportSettingsInput.safeParse(input);
	if (!r.success) throw ValidationError.fromZod(r.error);
	const next = r.data;
	return db().transaction(async (t) => {
		await db().query(
			`INSERT IGNORE INTO report_settings (workshop_id, version, created_at, updated_at) VALUES (?, 0, UTC_TIMESTAMP(3), UTC_TIMESTAMP(3))`,
			{ replacements: [actor.workshopId], type: QueryTypes.INSERT, transaction: t }
		);
		await db().query('SELECT version FROM report_settings WHERE workshop_id = ? FOR UPDATE', {
			replacements: [actor.workshopId],
			type: QueryTypes.SELECT,
			transaction: t
		});
		const now = await readReportSettings(actor.workshopId, t);
		if (now.version !== baseVersion) throw new StaleVersionError({ ...now });
		const changed = (Object.keys(COLUMNS) as (keyof typeof COLUMNS)[]).filter((k) => now[k] !== next[k]);
		if (!changed.length) return now;
		await db().query(
			`UPDATE report_settings SET ${changed.map((k) => `${COLUMNS[k]} = ?`).join(', ')}, version = version + 1,
			   updated_by = ?, updated_at = UTC_TIMESTAMP(3) WHERE workshop_id = ?`,
			{ replacements: [...changed.map((k) => next[k]), actor.userId, actor.workshopId], type: QueryTypes.UPDATE, transaction: t }
		);
		await writeAudit(t, actor, 'report_settings', actor.workshopId, 'update', changed.map((k) => ({ field: k, old: now[k], new: next[k] })), null);
		return readReportSettings(actor.workshopId, t);
	});
}
