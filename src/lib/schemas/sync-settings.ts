/**
 * The workshop's sync windows (a lead's or owner's setting, on the team page): how many days
 * a closed job stays on a technician's or apprentice's phone, and on a lead's or owner's.
 */
import { z } from 'zod';

const days = (who: string) =>
	z
		.string()
		.trim()
		.regex(/^\d{1,3}$/, `Give the days for ${who} as a whole number`)
		.transform(Number)
		.pipe(z.number().min(1, 'At least 1 day').max(365, 'At most 365 days'));

/** The form's fields: `phoneDays`, `deskDays` (whole days, 1 to 365). */
export const syncWindowsSchema = z.object({
	phoneDays: days("technicians' phones"),
	deskDays: days("leads' phones")
});
export type SyncWindowsInput = z.output<typeof syncWindowsSchema>;
