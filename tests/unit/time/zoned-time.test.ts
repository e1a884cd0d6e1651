/**
 * The one formatter behind the office pages, the report and the mails, across summer-time
 * changes. Every expected value comes from the IANA time zone database (tzdb) as published
 * rules; the runtime reads tzdb through Intl (ICU), a general-purpose reference outside the
 * project. Rules named beside each check:
 * - EU: summer time from the last Sunday of March to the last Sunday of October, both at
 *   01:00 UTC (Directive 2000/84/EC, arts. 2–3; tzdb `europe` file, Rule EU).
 * - US: from the second Sunday of March at 02:00 local to the first Sunday of November at
 *   02:00 local (15 U.S.C. §260a as amended by the Energy Policy Act 2005 §110; tzdb
 *   `northamerica`, Rule US).
 * - New South Wales: daylight time ends the first Sunday of April at 03:00 daylight time
 *   (tzdb `australasia`, Rule AN, from 2008).
 * - India: UTC+5:30 all year, no summer time (tzdb `asia`, Asia/Kolkata).
 */
import { describe, expect, it } from 'vitest';
import {
	clockIn,
	dayIn,
	defaultTimeZone,
	isoDayIn,
	isTimeZone,
	longDayIn,
	momentIn,
	offsetAt,
	offsetPieces,
	startOfDayIn,
	timeZoneNames
} from '../../../src/lib/zoned-time';

describe('moments in the workshop zone across summer-time changes', () => {
	it.each([
		// IANA tzdb via Intl: Europe/London moves to BST at 01:00 UTC on 2026-03-29 (Rule EU, last Sunday of March).
		['2026-03-29T00:59:00Z', 'Europe/London', '29 Mar 2026, 00:59 GMT'],
		['2026-03-29T01:00:00Z', 'Europe/London', '29 Mar 2026, 02:00 BST'],
		// IANA tzdb via Intl: Europe/London leaves BST at 01:00 UTC on 2026-10-25 (Rule EU, last Sunday of October).
		['2026-10-25T00:59:00Z', 'Europe/London', '25 Oct 2026, 01:59 BST'],
		['2026-10-25T01:00:00Z', 'Europe/London', '25 Oct 2026, 01:00 GMT'],
		// IANA tzdb via Intl: a reading at 14:05 UTC in July reads 15:05 on a London workshop's clock (BST = UTC+1).
		['2026-07-01T14:05:00Z', 'Europe/London', '1 Jul 2026, 15:05 BST'],
		// IANA tzdb via Intl: Europe/Berlin CET (UTC+1) to CEST (UTC+2) at the same instant, 01:00 UTC on 2026-03-29 (Rule EU).
		['2026-03-29T00:59:00Z', 'Europe/Berlin', '29 Mar 2026, 01:59 CET'],
		['2026-03-29T01:00:00Z', 'Europe/Berlin', '29 Mar 2026, 03:00 CEST'],
		// IANA tzdb via Intl: America/New_York springs forward at 02:00 EST (07:00 UTC) on 2026-03-08 (Rule US, second Sunday of March).
		['2026-03-08T06:59:00Z', 'America/New_York', '8 Mar 2026, 01:59 GMT-5'],
		['2026-03-08T07:00:00Z', 'America/New_York', '8 Mar 2026, 03:00 GMT-4'],
		// IANA tzdb via Intl: America/New_York falls back at 02:00 EDT (06:00 UTC) on 2026-11-01 (Rule US, first Sunday of November).
		['2026-11-01T05:59:00Z', 'America/New_York', '1 Nov 2026, 01:59 GMT-4'],
		['2026-11-01T06:00:00Z', 'America/New_York', '1 Nov 2026, 01:00 GMT-5'],
		// IANA tzdb via Intl: Australia/Sydney leaves daylight time at 03:00 AEDT (16:00 UTC the day before) on 2026-04-05 (Rule AN).
		['2026-04-04T15:59:00Z', 'Australia/Sydney', '5 Apr 2026, 02:59 GMT+11'],
		['2026-04-04T16:00:00Z', 'Australia/Sydney', '5 Apr 2026, 02:00 GMT+10'],
		// IANA tzdb via Intl: Asia/Kolkata is UTC+5:30 all year, so 18:35 UTC is already the next day.
		['2026-12-02T18:35:00Z', 'Asia/Kolkata', '3 Dec 2026, 00:05 GMT+5:30'],
		// UTC reads as the office pages read before zones existed ("3 Dec 2026, 14:05 UTC").
		['2026-12-03T14:05:00Z', 'UTC', '3 Dec 2026, 14:05 UTC']
	])('%s in %s reads %s', (at, zone, expected) => {
		expect(momentIn(at, zone)).toBe(expected);
	});

	it('give the clock alone, 24-hour, on both sides of the London change (IANA tzdb via Intl, Rule EU)', () => {
		expect(clockIn('2026-03-29T00:30:00Z', 'Europe/London')).toBe('00:30');
		expect(clockIn('2026-03-29T01:30:00Z', 'Europe/London')).toBe('02:30');
	});

	it('write the month in full for customers when asked', () => {
		// IANA tzdb via Intl: 2026-10-25 00:30 UTC is 01:30 BST in London (before the 01:00 UTC change).
		expect(momentIn('2026-10-25T00:30:00Z', 'Europe/London', 'long')).toBe(
			'25 October 2026, 01:30 BST'
		);
	});
});

describe('days in the workshop zone', () => {
	it('put a late-evening UTC moment on the next day east of Greenwich and not in London (IANA tzdb via Intl)', () => {
		// 2026-03-28 23:30 UTC: London is on GMT (UTC+0) until the next morning; Berlin on CET (UTC+1).
		expect(dayIn('2026-03-28T23:30:00Z', 'Europe/London')).toBe('28 Mar 2026');
		expect(dayIn('2026-03-28T23:30:00Z', 'Europe/Berlin')).toBe('29 Mar 2026');
		expect(isoDayIn('2026-03-28T23:30:00Z', 'Europe/Berlin')).toBe('2026-03-29');
	});

	it('put a summer-evening UTC moment on the next day in London (IANA tzdb via Intl: BST = UTC+1 in August)', () => {
		expect(isoDayIn('2026-08-14T23:30:00Z', 'Europe/London')).toBe('2026-08-15');
		expect(isoDayIn('2026-08-14T23:30:00Z', 'UTC')).toBe('2026-08-14');
		expect(longDayIn('2026-08-14T23:30:00Z', 'Europe/London')).toBe('15 August 2026');
	});

	it('read a day west of Greenwich as the day before (IANA tzdb via Intl: New York on EST, UTC-5, in December)', () => {
		expect(dayIn('2026-12-03T03:00:00Z', 'America/New_York')).toBe('2 Dec 2026');
		expect(isoDayIn(new Date('2026-12-03T03:00:00Z'), 'America/New_York')).toBe('2026-12-02');
	});
});

describe('zone names', () => {
	it('know IANA names and UTC, and refuse made-up ones', () => {
		expect(isTimeZone('Europe/London')).toBe(true);
		expect(isTimeZone('UTC')).toBe(true);
		expect(isTimeZone('Mars/Olympus_Mons')).toBe(false);
		expect(isTimeZone('')).toBe(false);
	});

	it('take the current IANA name of a zone the runtime lists under an older one, but not a mis-cased name', () => {
		// IANA tzdb `backward` file: Asia/Calcutta is the older name of Asia/Kolkata, Europe/Kiev of Europe/Kyiv.
		expect(isTimeZone('Asia/Kolkata')).toBe(true);
		expect(isTimeZone('Europe/Kyiv')).toBe(true);
		expect(isTimeZone('europe/london')).toBe(false);
		expect(isTimeZone('Etc/GMT+5x')).toBe(false);
	});

	it('list UTC first, then every zone the runtime knows once', () => {
		const names = timeZoneNames();
		expect(names[0]).toBe('UTC');
		expect(names).toContain('Europe/London');
		expect(new Set(names).size).toBe(names.length);
	});

	it("take the server's TZ for a new workshop when it is a known name, else a known default", () => {
		expect(defaultTimeZone('Europe/Lisbon')).toBe('Europe/Lisbon');
		const fallback = defaultTimeZone('Nowhere/Made_Up');
		expect(fallback).not.toBe('Nowhere/Made_Up');
		expect(isTimeZone(fallback)).toBe(true);
	});
});

describe('offsets and the start of a day', () => {
	it('give the offset east of UTC on each side of a change (IANA tzdb via Intl, Rules EU and US)', () => {
		expect(offsetAt(Date.parse('2026-03-29T00:59:59Z'), 'Europe/London')).toBe(0);
		expect(offsetAt(Date.parse('2026-03-29T01:00:00Z'), 'Europe/London')).toBe(3600);
		expect(offsetAt(Date.parse('2026-07-01T12:00:00Z'), 'America/New_York')).toBe(-4 * 3600);
		expect(offsetAt(Date.parse('2026-12-01T12:00:00Z'), 'Asia/Kolkata')).toBe(5.5 * 3600);
	});

	it("find the instant a day begins on the workshop's clock (IANA tzdb via Intl)", () => {
		// London in summer (BST, UTC+1): 15 August begins at 23:00 UTC on the 14th.
		expect(new Date(startOfDayIn('2026-08-15', 'Europe/London')).toISOString()).toBe(
			'2026-08-14T23:00:00.000Z'
		);
		// London in winter (GMT): at midnight UTC. The day of the change (29 March) begins on GMT.
		expect(new Date(startOfDayIn('2026-12-03', 'Europe/London')).toISOString()).toBe(
			'2026-12-03T00:00:00.000Z'
		);
		expect(new Date(startOfDayIn('2026-03-30', 'Europe/London')).toISOString()).toBe(
			'2026-03-29T23:00:00.000Z'
		);
		// New York on EST (UTC-5) in December.
		expect(new Date(startOfDayIn('2026-12-03', 'America/New_York')).toISOString()).toBe(
			'2026-12-03T05:00:00.000Z'
		);
	});

	it('split a year into the pieces between summer-time changes (IANA tzdb via Intl, Rule EU: 2026-03-29 and 2026-10-25 at 01:00 UTC)', () => {
		const pieces = offsetPieces(
			Date.parse('2026-01-01T00:00:00Z'),
			Date.parse('2027-01-01T00:00:00Z'),
			'Europe/London'
		);
		expect(pieces).toEqual([
			{ until: Date.parse('2026-03-29T01:00:00Z'), offset: 0 },
			{ until: Date.parse('2026-10-25T01:00:00Z'), offset: 3600 },
			{ until: null, offset: 0 }
		]);
		expect(
			offsetPieces(
				Date.parse('2026-01-01T00:00:00Z'),
				Date.parse('2027-01-01T00:00:00Z'),
				'Asia/Kolkata'
			)
		).toEqual([{ until: null, offset: 19800 }]);
	});
});
