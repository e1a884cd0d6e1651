/**
 * The workshop navigation as each role sees it, on a phone (390×844) and at a desk (1280×800):
 * every entry opens a page that role may use, with the current place marked by a bar as well
 * as `aria-current="page"`; every place of the list the role does not see answers 403 or 404
 * when its address is typed in. Each page a lead or a technician opens is checked with
 * axe-core's WCAG 2.2 A and AA rules. The entries come from the page itself and are compared
 * with the one list in `$lib/nav`, so a place added there is checked here without a new line.
 */
import type { Page } from 'playwright-core';
import { afterAll, afterEach, beforeAll, describe, expect, inject, it } from 'vitest';
import { NAV, navFor } from '../../src/lib/nav';
import type { Role } from '../../src/lib/roles';
import { DEMO_USERS } from '../../src/lib/server/seed/demo';
import { readPalette } from '../../scripts/lib/palette.js';
import { axeViolations } from './axe';
import { openAt, shot, signInAs } from './browser';

const base = inject('baseURL');
const person = (role: Role) => DEMO_USERS.find((u) => u.role === role)!;
/** Whose navigation is checked, and whether every page also goes through axe-core. */
const PEOPLE: { role: Role; axe: boolean }[] = [
	{ role: 'lead', axe: true },
	{ role: 'technician', axe: true },
	{ role: 'apprentice', axe: false }
];
const GLOVE = 56; // px: the smallest touch target (DESIGN §7)

type Browser = Awaited<ReturnType<typeof openAt>>;

/** The entries the visible navigation offers (the phone's More menu included), in order. */
async function offered(page: Page, nav: string) {
	return page
		.getByTestId(nav)
		.locator('a[data-entry]')
		.evaluateAll((as) => as.map((a) => a.getAttribute('href')));
}

/** Visible entries and the More button are glove-sized on a phone, and full rows at a desk. */
async function expectGloveSized(page: Page, nav: string) {
	const small = await page
		.getByTestId(nav)
		.locator('a, button')
		.evaluateAll(
			(els, min) =>
				els
					.filter((e) => (e as HTMLElement).offsetParent !== null)
					.map((e) => ({ text: e.textContent?.trim(), ...e.getBoundingClientRect().toJSON() }))
					.filter((r) => r.height < min || r.width < min)
					.map((r) => `${r.text} ${Math.round(r.width)}×${Math.round(r.height)}`),
			GLOVE
		);
	expect(small).toEqual([]);
}

/** The one link marked as the current place points at `href`, and its bar can be seen. */
async function expectMarkedHere(page: Page, nav: string, href: string) {
	const current = page.getByTestId(nav).locator('a[aria-current="page"]');
	expect(await current.count(), `one current place on ${href}`).toBe(1);
	expect(await current.getAttribute('href')).toBe(href);
	if (!(await current.isVisible())) {
		// On a phone, a place under More: the More button carries the bar; the menu shows which.
		expect(await page.getByTestId('nav-more').getByTestId('current-marker').isVisible()).toBe(true);
		await page.getByTestId('nav-more').click();
		await current.waitFor();
	}
	expect(await current.getByTestId('current-marker').isVisible()).toBe(true);
	if (await page.locator('#nav-more:popover-open').count()) await page.keyboard.press('Escape');
}

for (const size of ['phone', 'desk'] as const) {
	const nav = size === 'phone' ? 'nav-bar' : 'nav-side';
	const other = size === 'phone' ? 'nav-side' : 'nav-bar';

	describe(`the workshop navigation at ${size} size`, () => {
		let b: Browser;
		beforeAll(async () => {
			b = await openAt(size);
			b.page.setDefaultTimeout(15_000);
		});
		afterEach(() => {
			expect(b.errors, 'uncaught errors in the page').toEqual([]);
		});
		afterAll(async () => {
			await b?.close();
		});

		for (const who of PEOPLE) {
			it(`takes the ${who.role} to every place of theirs, marked, and to no other`, async () => {
				const { page } = b;
				await signInAs(b, base, person(who.role).email);
				await page.goto(`${base}/jobs`);
				expect(await page.getByTestId(other).isVisible()).toBe(false);
				const hrefs = await offered(page, nav);
				expect(hrefs).toEqual(navFor(who.role).map((e) => e.href));
				if (who.role === 'lead') expect(hrefs).toContain('/team');
				else for (const h of ['/team', '/conflicts', '/overview']) expect(hrefs).not.toContain(h);
				await expectGloveSized(page, nav);
				if (who.role !== 'apprentice') await shot(page, `navigation-${size}-${who.role}`);

				for (const href of hrefs as string[]) {
					const r = await page.goto(`${base}${href}`);
					expect(r?.status(), href).toBe(200);
					await expectMarkedHere(page, nav, href);
					if (who.axe) expect(await axeViolations(page), `${href}`).toEqual([]);
				}

				for (const e of NAV.filter((e) => !e.roles.includes(who.role))) {
					const r = await page.goto(`${base}${e.href}`);
					expect([403, 404], `${e.href} typed in`).toContain(r?.status());
				}
			});
		}

		it('marks a page under a place (a job, a part) as that place', async () => {
			const { page } = b;
			await signInAs(b, base, person('technician').email);
			await page.goto(`${base}/library`);
			await page
				.getByTestId(size === 'phone' ? 'library-cards' : 'library-table')
				.getByRole('link')
				.first()
				.click();
			await page.waitForURL(/\/library\/[0-9a-f-]{36}$/);
			await expectMarkedHere(page, nav, '/library');
			expect(await axeViolations(page)).toEqual([]);
		});
	});
}

describe('the phone’s More menu and the field home', () => {
	let b: Browser;
	beforeAll(async () => {
		b = await openAt('phone');
		b.page.setDefaultTimeout(15_000);
	});
	afterEach(() => {
		expect(b.errors, 'uncaught errors in the page').toEqual([]);
	});
	afterAll(async () => {
		await b?.close();
	});

	it('opens the lead’s More menu with the team, the way home and sign-out', async () => {
		const { page } = b;
		await signInAs(b, base, person('lead').email);
		await page.goto(`${base}/jobs`);
		// Hydrated first: a menu opened while the page's script takes over can close again.
		await page.waitForLoadState('networkidle');
		await page.getByTestId('nav-more').click();
		const menu = page.locator('#nav-more');
		await menu.getByRole('link', { name: 'Team' }).waitFor();
		await menu.getByRole('link', { name: /Home/ }).waitFor();
		await menu.getByRole('link', { name: 'Sign out' }).waitFor();
		await expectGloveSized(page, 'nav-bar');
		expect(await axeViolations(page)).toEqual([]);
		await shot(page, 'navigation-phone-lead-more');
		await menu.getByRole('link', { name: 'Team' }).click();
		await page.waitForURL(`${base}/team`);
		expect(await menu.isVisible()).toBe(false);
		await expectMarkedHere(page, 'nav-bar', '/team');
	});

	it('offers the office from the field home when online, and says why not when offline', async () => {
		const { page, context } = b;
		await signInAs(b, base, person('technician').email);
		const office = page.getByTestId('to-office');
		expect(await office.evaluate((e) => e.tagName)).toBe('A');
		expect(await office.textContent()).toContain('Parts library');
		expect(await axeViolations(page)).toEqual([]);
		await context.setOffline(true);
		try {
			await expect.poll(() => office.textContent()).toContain('needs a connection');
			expect(await office.evaluate((e) => e.tagName)).toBe('P');
			expect(await axeViolations(page)).toEqual([]);
			await shot(page, 'navigation-field-offline');
		} finally {
			await context.setOffline(false);
		}
		await expect.poll(() => office.evaluate((e) => e.tagName)).toBe('A');
		await office.click();
		await page.waitForURL(`${base}/jobs`);
		await expectMarkedHere(page, 'nav-bar', '/jobs');
	});
});

describe('the installed app’s colours and icons', () => {
	const palette = readPalette();
	let b: Browser;
	beforeAll(async () => {
		b = await openAt('phone');
	});
	afterAll(async () => {
		await b?.close();
	});

	it('serves a manifest in the palette’s paper and ink, with every icon it names', async () => {
		const manifest = await (await fetch(`${base}/manifest.webmanifest`)).json();
		expect(manifest.background_color).toBe(palette.paper);
		expect(manifest.theme_color).toBe(palette.ink);
		const purposes = new Set(manifest.icons.map((i: { purpose: string }) => i.purpose));
		expect([...purposes].sort()).toEqual(['any', 'maskable']);
		for (const icon of manifest.icons) {
			const r = await fetch(`${base}${icon.src}`);
			expect(r.status, icon.src).toBe(200);
			expect(r.headers.get('content-type')).toBe('image/png');
		}
	});

	it('keeps the maskable icon’s mark inside the safe zone and the tile’s corners clear', async () => {
		const { page } = b;
		await page.goto(`${base}/sign-in`);
		// W3C Web App Manifest, "Icon masks": the safe zone is a centred circle whose radius
		// is 40 % of the icon's size; outside it a maskable icon is only background.
		const outside = await page.evaluate(async (ink) => {
			const load = async (src: string) => {
				const img = new Image();
				img.src = src;
				await img.decode();
				const c = document.createElement('canvas');
				[c.width, c.height] = [img.width, img.height];
				const g = c.getContext('2d')!;
				g.drawImage(img, 0, 0);
				return g.getImageData(0, 0, c.width, c.height);
			};
			const m = await load('/icons/maskable-512.png');
			const [r, gr, bl] = [1, 3, 5].map((i) => parseInt(ink.slice(i, i + 2), 16));
			let stray = 0;
			for (let y = 0; y < m.height; y++)
				for (let x = 0; x < m.width; x++) {
					if (Math.hypot(x + 0.5 - m.width / 2, y + 0.5 - m.height / 2) <= 0.4 * m.width) continue;
					const i = (y * m.width + x) * 4;
					const d = Math.abs(m.data[i] - r) + Math.abs(m.data[i + 1] - gr) + Math.abs(m.data[i + 2] - bl);
					if (d > 6 || m.data[i + 3] < 255) stray++;
				}
			const any = await load('/icons/icon-512.png');
			return { stray, cornerAlpha: any.data[3] };
		}, palette.ink);
		expect(outside).toEqual({ stray: 0, cornerAlpha: 0 });
	});
});
