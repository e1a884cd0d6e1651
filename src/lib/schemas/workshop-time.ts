/** The workshop's time zone (a lead's or owner's setting, on the team page). */
import { z } from 'zod';
import { isTimeZone } from '../zoned-time';

/** The form's field: `timeZone`, an IANA zone name this runtime knows (`Europe/London`), or `UTC`. */
export const workshopTimeSchema = z.object({
	timeZone: z
		.string()
		.trim()
		.min(1, 'Choose the time zone the workshop is in')
		.max(64, 'Choose a time zone from the list, like Europe/London')
		.refine(isTimeZone, 'Choose a time zone from the list, like Europe/London')
});
export type WorkshopTimeInput = z.output<typeof workshopTimeSchema>;
