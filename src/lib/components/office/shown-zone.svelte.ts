/**
 * The zone the office pages show times in: the workshop's (set by the office and lead layouts
 * from the signed-in user's workshop), or `null` for the device's own (the phone screens).
 *
 * One value for the page, not a prop threaded through every component: server rendering is
 * synchronous, and each layout sets it before its page renders, so one request's zone never
 * shows on another's page. In the browser it is reactive, so a changed zone redraws the times.
 */
export const shownZone = $state<{ zone: string | null }>({ zone: null });

/** Show the page's dates and times in `zone` (`null`: the device's own zone). */
export function showTimesIn(zone: string | null): void {
	if (shownZone.zone !== zone) shownZone.zone = zone;
}
