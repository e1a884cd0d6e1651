/**
 * The one navigation of the workshop pages (office, parts library, lead's desk): every place,
 * who sees it, and how it is drawn. Adding a place is one line in `NAV`; the screens, the
 * counts and the end-to-end check all read this list. The technician's offline screens
 * (/field…) keep their own header and are not in it.
 */
import { ROLES, type Role } from './roles';

/** Drawn by `components/nav/NavIcon.svelte`. */
export type NavIconName =
	| 'jobs'
	| 'customers'
	| 'vehicles'
	| 'parts'
	| 'clashes'
	| 'signoffs'
	| 'overview'
	| 'team'
	| 'payments'
	| 'home'
	| 'more'
	| 'sign-out';

/** A count shown beside an entry; worked out on the server (`server/nav.ts`). */
export type NavCount = 'clashes' | 'signoffs';
/** What a count beside an entry means, read after the number ("3 open"). */
export const NAV_COUNT_WORDS: Record<NavCount, string> = { clashes: 'open', signoffs: 'waiting' };

/**
 * A part of the product that a place needs and that may not be switched on yet: its entries
 * stay out of the navigation (and out of the end-to-end check) until it is in `FEATURES`.
 */
export type NavFeature = 'lead-desk';

export type NavEntry = {
	/** What the place is called; its page's heading says the same or more (Team: "Workshop team"). */
	label: string;
	/** A shorter label for the phone's bottom bar (about 10 characters fit). */
	short?: string;
	href: string;
	roles: readonly Role[];
	icon: NavIconName;
	count?: NavCount;
	requires?: NavFeature;
};

const EVERYONE = ROLES;
const LEADS: readonly Role[] = ['lead', 'owner'];

/** The lead's desk (the clash inbox, the sign-offs and the overview) is switched on with its pages. */
export const FEATURES: Readonly<Record<NavFeature, boolean>> = { 'lead-desk': true };

export const NAV: readonly NavEntry[] = [
	{ label: 'Jobs', href: '/jobs', roles: EVERYONE, icon: 'jobs' },
	{ label: 'Customers', href: '/customers', roles: EVERYONE, icon: 'customers' },
	{ label: 'Vehicles', href: '/vehicles', roles: EVERYONE, icon: 'vehicles' },
	{ label: 'Parts library', short: 'Parts', href: '/library', roles: EVERYONE, icon: 'parts' },
	{ label: 'Clashes', href: '/conflicts', roles: LEADS, icon: 'clashes', count: 'clashes', requires: 'lead-desk' },
	{ label: 'Sign-offs', href: '/signoffs', roles: LEADS, icon: 'signoffs', count: 'signoffs', requires: 'lead-desk' },
	{ label: 'Overview', href: '/overview', roles: LEADS, icon: 'overview', requires: 'lead-desk' },
	{ label: 'Team', href: '/team', roles: LEADS, icon: 'team' },
	{ label: 'Payments', href: '/payments', roles: LEADS, icon: 'payments' }
];

/** How many entries the phone's bottom bar shows before the rest go under "More". */
export const PHONE_BAR_SLOTS = 4;

/** The technician's own screens, which work offline; every workshop page links back to them. */
export const FIELD_HOME = { label: 'Home', hint: 'My jobs, works offline', href: '/field' } as const;

/** The entries `role` sees, in list order: its roles include it and its feature is on. */
export function navFor(
	role: Role,
	features: Readonly<Record<NavFeature, boolean>> = FEATURES,
	entries: readonly NavEntry[] = NAV
): NavEntry[] {
	return entries.filter((e) => e.roles.includes(role) && (!e.requires || features[e.requires]));
}

/**
 * The entry that holds `pathname`: its own address or anything under it (`/jobs/42` is in
 * Jobs); the longest match wins, so a nested place can have an entry of its own.
 */
export function currentEntry(entries: readonly NavEntry[], pathname: string): NavEntry | undefined {
	const path = pathname.length > 1 ? pathname.replace(/\/+$/, '') : pathname;
	return entries
		.filter((e) => path === e.href || path.startsWith(`${e.href}/`))
		.sort((a, b) => b.href.length - a.href.length)[0];
}

/** Splits the entries into the phone's bottom bar and its "More" menu. */
export function splitForPhone(entries: readonly NavEntry[], slots = PHONE_BAR_SLOTS) {
	return { bar: entries.slice(0, slots), more: entries.slice(slots) };
}
