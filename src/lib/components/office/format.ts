/** Display helpers for the office pages (dates in the browser's time zone). */

/** "3 Dec 2026" for an ISO date-time; '' for nothing. */
export function dayOf(iso: string | Date | null | undefined): string {
	if (!iso) return '';
	return new Date(iso).toLocaleDateString('en-GB', {
		day: 'numeric',
		month: 'short',
		year: 'numeric',
		timeZone: 'UTC'
	});
}

/** "3 Dec 2026, 14:05 UTC" for an ISO date-time. */
export function momentOf(iso: string | Date | null | undefined): string {
	if (!iso) return '';
	const d = new Date(iso);
	return `${dayOf(d)}, ${d.toISOString().slice(11, 16)} UTC`;
}

/** "Corvane Brisel · TB24 KQL" */
export function vehicleLabel(
	v: { make: string; model: string; plate?: string | null; year?: number | null } | null
) {
	if (!v) return '';
	return [`${v.make} ${v.model}`, v.year, v.plate].filter(Boolean).join(' · ');
}
