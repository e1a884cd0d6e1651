/** How the overview shows its figures (the same text on the server and in the browser). */
import { formatQuantity } from '../domain/units';
import type { Bucket } from './tables';

const DAY = new Intl.DateTimeFormat('en-GB', {
	day: 'numeric',
	month: 'short',
	year: 'numeric',
	timeZone: 'UTC'
});
const MONTH = new Intl.DateTimeFormat('en-GB', {
	month: 'short',
	year: 'numeric',
	timeZone: 'UTC'
});

/** A rate 0–1 as a whole percentage ("25 %"), one decimal below 10 %; "—" for none. */
export function percent(rate: number | null): string {
	if (rate == null) return '—';
	const p = rate * 100;
	return `${p > 0 && p < 10 ? p.toFixed(1) : Math.round(p)} %`;
}

/** Ohms as a technician reads them ("80 mΩ", "0.12 Ω"); "—" for none. */
export function ohms(v: number | null): string {
	return v == null ? '—' : formatQuantity(v, 'resistance', { locale: 'en-GB' });
}

/** "3 Dec 2026" for a YYYY-MM-DD day. */
export const dayText = (day: string) => DAY.format(new Date(`${day}T00:00:00Z`));

/** A period's name: its day, "week of 30 Nov 2026", or "Dec 2026". */
export function periodText(period: string, bucket: Bucket): string {
	if (bucket === 'month') return MONTH.format(new Date(`${period}T00:00:00Z`));
	return bucket === 'week' ? `week of ${dayText(period)}` : dayText(period);
}
