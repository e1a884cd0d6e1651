/**
 * Dates and times in a named time zone: the one formatter behind every server-rendered date on
 * the office pages, the customer's report (page and PDF) and the mails, so a reading taken at
 * 15:05 in the workshop reads 15:05 wherever it is shown. Pure and isomorphic (Intl only).
 *
 * A zone is an IANA name (`Europe/London`); `null` means the runtime's own zone (the phone's,
 * in the browser). Words stay as before: "3 Dec 2026", "3 December 2026", "3 Dec 2026, 15:05 BST".
 */

/** The zone a workshop falls back to when nothing better is known. */
export const UTC = 'UTC';

let known: Set<string> | null = null;

const IANA_SHAPE = /^(?:[A-Z][A-Za-z_-]*\/)+[A-Z][A-Za-z0-9_+-]*$/;

/**
 * Whether `zone` is an IANA zone name this runtime knows: one `Intl.supportedValuesOf('timeZone')`
 * lists, `UTC` (Node 20's list leaves it out), or another IANA name of a listed zone (the list
 * keeps older names: it has `Asia/Calcutta`, and `Asia/Kolkata` is its current name).
 */
export function isTimeZone(zone: string): boolean {
	known ??= new Set([...Intl.supportedValuesOf('timeZone'), UTC]);
	if (known.has(zone)) return true;
	if (!IANA_SHAPE.test(zone)) return false;
	try {
		return known.has(new Intl.DateTimeFormat('en', { timeZone: zone }).resolvedOptions().timeZone);
	} catch {
		return false; // RangeError: no such zone
	}
}

/** Every zone a lead may choose, `UTC` first, then A–Z. */
export function timeZoneNames(): string[] {
	return [UTC, ...Intl.supportedValuesOf('timeZone').filter((z) => z !== UTC)];
}

/** The zone for a new workshop: the server's own (`TZ`, else Intl's default) if it is a known name, else `UTC`. */
export function defaultTimeZone(
	env: string | undefined = typeof process === 'undefined' ? undefined : process.env.TZ
): string {
	for (const z of [env, Intl.DateTimeFormat().resolvedOptions().timeZone]) {
		if (z && isTimeZone(z)) return z;
	}
	return UTC;
}

type Parts = {
	day: string;
	month: string;
	year: string;
	hour: string;
	minute: string;
	zoneName: string;
};
const formatters = new Map<string, Intl.DateTimeFormat>();

function formatter(zone: string | null, month: 'short' | 'long'): Intl.DateTimeFormat {
	const key = `${zone ?? ''}|${month}`;
	let f = formatters.get(key);
	if (!f) {
		f = new Intl.DateTimeFormat('en-GB', {
			timeZone: zone ?? undefined,
			day: 'numeric',
			month,
			year: 'numeric',
			hour: '2-digit',
			minute: '2-digit',
			hourCycle: 'h23',
			timeZoneName: 'short'
		});
		formatters.set(key, f);
	}
	return f;
}

function partsIn(
	at: Date | string | number,
	zone: string | null,
	month: 'short' | 'long' = 'short'
): Parts {
	const p: Record<string, string> = {};
	for (const x of formatter(zone, month).formatToParts(new Date(at))) p[x.type] = x.value;
	return {
		day: p.day,
		month: p.month,
		year: p.year,
		hour: p.hour,
		minute: p.minute,
		zoneName: p.timeZoneName
	};
}

/** "3 Dec 2026": the calendar day of the instant `at` in `zone`. */
export function dayIn(at: Date | string | number, zone: string | null): string {
	const p = partsIn(at, zone);
	return `${p.day} ${p.month} ${p.year}`;
}

/** "3 December 2026": the day in words, as the customer's report and mails print it. */
export function longDayIn(at: Date | string | number, zone: string | null): string {
	const p = partsIn(at, zone, 'long');
	return `${p.day} ${p.month} ${p.year}`;
}

/**
 * "3 Dec 2026, 15:05 BST": day, 24-hour clock and the zone's short name at that instant ("UTC",
 * "CEST", "GMT-4"); with `month: 'long'`, "3 December 2026, 15:05 BST" (for customers).
 */
export function momentIn(
	at: Date | string | number,
	zone: string | null,
	month: 'short' | 'long' = 'short'
): string {
	const p = partsIn(at, zone, month);
	return `${p.day} ${p.month} ${p.year}, ${p.hour}:${p.minute} ${p.zoneName}`;
}

/** "15:05": the clock time alone (24-hour) of `at` in `zone`. */
export function clockIn(at: Date | string | number, zone: string | null): string {
	const p = partsIn(at, zone);
	return `${p.hour}:${p.minute}`;
}

/** `YYYY-MM-DD`: the calendar day of `at` in `zone` (for a stored day such as the report's). */
export function isoDayIn(at: Date | string | number, zone: string | null): string {
	const p: Record<string, string> = {};
	const f = new Intl.DateTimeFormat('en-CA', {
		timeZone: zone ?? undefined,
		year: 'numeric',
		month: '2-digit',
		day: '2-digit'
	});
	for (const x of f.formatToParts(new Date(at))) p[x.type] = x.value;
	return `${p.year}-${p.month}-${p.day}`;
}

/** "Europe/London" → "Europe/London"; "America/Argentina/Buenos_Aires" → "America/Argentina/Buenos Aires". */
export const zoneWords = (zone: string) => zone.replaceAll('_', ' ');

/** Seconds east of UTC that `zone` is at the instant `ms` (3600 for BST, -14400 for EDT). */
export function offsetAt(ms: number, zone: string | null): number {
	const p: Record<string, string> = {};
	const f = new Intl.DateTimeFormat('en-US', {
		timeZone: zone ?? undefined,
		year: 'numeric',
		month: 'numeric',
		day: 'numeric',
		hour: 'numeric',
		minute: 'numeric',
		second: 'numeric',
		hourCycle: 'h23'
	});
	for (const x of f.formatToParts(new Date(ms))) p[x.type] = x.value;
	const wall = Date.UTC(+p.year, +p.month - 1, +p.day, +p.hour, +p.minute, +p.second);
	return Math.round((wall - Math.floor(ms / 1000) * 1000) / 1000);
}

/** The instant (ms since 1970) at which the day `YYYY-MM-DD` begins on the clocks of `zone`. */
export function startOfDayIn(day: string, zone: string | null): number {
	const midnight = Date.parse(`${day}T00:00:00Z`);
	const first = midnight - offsetAt(midnight, zone) * 1000;
	return midnight - offsetAt(first, zone) * 1000;
}

const DAY_MS = 86_400_000;

/**
 * The offsets `zone` keeps over the instants [fromMs, toMs): one piece per offset, each with the
 * instant it ends (`until`, ms; `null` for the last). Changes are found day by day, then to the second.
 */
export function offsetPieces(
	fromMs: number,
	toMs: number,
	zone: string | null
): { until: number | null; offset: number }[] {
	const pieces: { until: number | null; offset: number }[] = [];
	let offset = offsetAt(fromMs, zone);
	for (let lo = fromMs; lo < toMs; lo += DAY_MS) {
		let hi = Math.min(lo + DAY_MS, toMs);
		if (offsetAt(hi, zone) === offset) continue;
		let a = lo;
		while (hi - a > 1000) {
			const mid = Math.floor((a + hi) / 2);
			if (offsetAt(mid, zone) === offset) a = mid;
			else hi = mid;
		}
		const change = Math.floor(hi / 1000) * 1000;
		pieces.push({ until: change, offset });
		offset = offsetAt(change, zone);
		lo = change - DAY_MS; // the loop's step lands on the change
	}
	pieces.push({ until: null, offset });
	return pieces;
}
