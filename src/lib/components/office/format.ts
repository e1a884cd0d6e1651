/** Display helpers for the office pages: dates in the workshop's time zone (see `shown-zone.svelte.ts`). */
import { dayIn, momentIn } from '$lib/zoned-time';
import { shownZone } from './shown-zone.svelte';

const DATE_ONLY = /^\d{4}-\d{2}-\d{2}$/;

/** "3 Dec 2026" for an ISO date-time (its day in the shown zone) or a `YYYY-MM-DD` day (as is); '' for nothing. */
export function dayOf(iso: string | Date | null | undefined): string {
	if (!iso) return '';
	if (typeof iso === 'string' && DATE_ONLY.test(iso)) return dayIn(`${iso}T12:00:00Z`, 'UTC');
	return dayIn(iso, shownZone.zone);
}

/** "3 Dec 2026, 15:05 BST" for an ISO date-time, in the shown zone, the zone named. */
export function momentOf(iso: string | Date | null | undefined): string {
	if (!iso) return '';
	return momentIn(iso, shownZone.zone);
}

/** "Corvane Brisel · TB24 KQL" */
export function vehicleLabel(
	v: { make: string; model: string; plate?: string | null; year?: number | null } | null
) {
	if (!v) return '';
	return [`${v.make} ${v.model}`, v.year, v.plate].filter(Boolean).join(' · ');
}
