/**
 * The workshop navigation's one list: who sees which place (DESIGN §6: approving, signing off
 * and settling clashes, and the team, are for leads and owners), which entry holds the page
 * you are on, and how the phone's bottom bar is filled.
 */
import { describe, expect, it } from 'vitest';
import { currentEntry, NAV, navFor, splitForPhone, type NavEntry } from '../../src/lib/nav';

const ALL_ON = { 'lead-desk': true } as const;
const ALL_OFF = { 'lead-desk': false } as const;
const hrefs = (entries: NavEntry[]) => entries.map((e) => e.href);

describe('who sees which place', () => {
	it.each(['lead', 'owner'] as const)('shows a %s every place once the lead’s desk is on', (role) => {
		expect(hrefs(navFor(role, ALL_ON))).toEqual([
			'/jobs',
			'/customers',
			'/vehicles',
			'/library',
			'/conflicts',
			'/signoffs',
			'/overview',
			'/team',
			'/payments'
		]);
	});

	it.each(['technician', 'apprentice'] as const)(
		'shows a %s the jobs, customers, vehicles and parts library, never the clashes, overview or team',
		(role) => {
			expect(hrefs(navFor(role, ALL_ON))).toEqual(['/jobs', '/customers', '/vehicles', '/library']);
		}
	);

	it('keeps the places of a part that is not switched on out of the navigation', () => {
		expect(hrefs(navFor('lead', ALL_OFF))).toEqual([
			'/jobs',
			'/customers',
			'/vehicles',
			'/library',
			'/team',
			'/payments'
		]);
	});

	it('calls the spec library the parts library, as the phone does', () => {
		expect(NAV.find((e) => e.href === '/library')?.label).toBe('Parts library');
	});

	it('gives every place its own address and label', () => {
		expect(new Set(NAV.map((e) => e.href)).size).toBe(NAV.length);
		expect(new Set(NAV.map((e) => e.label)).size).toBe(NAV.length);
	});
});

describe('the place you are in', () => {
	const entries = navFor('lead', ALL_ON);
	it.each([
		['/jobs', '/jobs'],
		['/jobs/', '/jobs'],
		['/jobs/0190a1b2-0000-7000-8000-000000000001', '/jobs'],
		['/customers/new', '/customers'],
		['/library/0190a1b2-0000-7000-8000-000000000001/sheets/new', '/library'],
		['/team', '/team']
	])('puts %s under %s', (path, href) => {
		expect(currentEntry(entries, path)?.href).toBe(href);
	});

	it.each(['/jobsheet', '/field', '/field/job/1', '/', '/sign-out'])(
		'puts %s under no entry',
		(path) => {
			expect(currentEntry(entries, path)).toBeUndefined();
		}
	);

	it('prefers the longest matching address, so a nested place can have its own entry', () => {
		const nested: NavEntry[] = [
			{ label: 'Parts library', href: '/library', roles: ['lead'], icon: 'parts' },
			{ label: 'CSV files', href: '/library/csv', roles: ['lead'], icon: 'parts' }
		];
		expect(currentEntry(nested, '/library/csv')?.label).toBe('CSV files');
		expect(currentEntry(nested, '/library/abc')?.label).toBe('Parts library');
	});
});

describe('the phone’s bottom bar', () => {
	it('shows the first four places and puts the rest under More', () => {
		const { bar, more } = splitForPhone(navFor('lead', ALL_ON));
		expect(hrefs(bar)).toEqual(['/jobs', '/customers', '/vehicles', '/library']);
		expect(hrefs(more)).toEqual(['/conflicts', '/signoffs', '/overview', '/team', '/payments']);
	});

	it('gives a technician every place in the bar', () => {
		const { bar, more } = splitForPhone(navFor('technician', ALL_ON));
		expect(bar).toHaveLength(4);
		expect(more).toEqual([]);
	});

	it('fits every bar label in a fifth of a 390 px phone (about 10 characters)', () => {
		for (const e of NAV) expect((e.short ?? e.label).length, e.label).toBeLessThanOrEqual(10);
	});
});
