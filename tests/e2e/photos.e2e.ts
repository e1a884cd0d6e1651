/**
 * Evidence photos end to end at 390×844: a technician attaches a photo with no signal
 * (through the file chooser, as the camera or gallery hands it over), reloads the page
 * offline and still sees it, goes online and sees it sent; the lead then sees it on the
 * job's desk page and opens it full size. The photo that reaches the workshop is the one the
 * phone shrank: longest side 1,600 px, upright (the camera's orientation tag applied), and
 * without the camera's metadata (its location).
 *
 * References outside the project: EXIF orientation 6 means "rotate 90° clockwise to show"
 * (CIPA DC-008 / JEITA EXIF 2.32, tag 0x0112); the GPS block is the IFD that tag 0x8825 points
 * to (same standard, §4.6.3). The pictures are made and read back with sharp (libvips).
 */
import sharp from 'sharp';
import { afterAll, afterEach, beforeAll, describe, expect, inject, it } from 'vitest';
import { DEMO_PASSWORD, DEMO_USERS, DEMO_WORKSHOP } from '../../src/lib/server/seed/demo';
import { axeViolations } from './axe';
import { openAt, openPhone, shot, signInAs } from './browser';

const base = inject('baseURL');
const TECH = 'photos-tech@tallowbridge.example';
let JOB = '';
let phone: Awaited<ReturnType<typeof openPhone>>;
let desk: Awaited<ReturnType<typeof openAt>> | null = null;
let camera: Buffer;

beforeAll(async () => {
	Object.assign(process.env, inject('dbEnv'));
	const { createUser } = await import('../../src/lib/server/services/workshops');
	const { jobs } = await import('../../src/lib/server/services/jobs');
	const { closeDb } = await import('../../src/lib/server/db');
	const tech = await createUser(DEMO_WORKSHOP.id, { email: TECH, name: 'Photo Technician', role: 'technician', password: DEMO_PASSWORD });
	const job = await jobs.create(
		{ userId: DEMO_USERS[1].id, workshopId: DEMO_WORKSHOP.id, role: 'lead', deviceId: 'e2e' },
		{ complaint: 'Burning smell near the fuse box', assigneeId: tech.id }
	);
	JOB = job.id as string;
	await closeDb();
	// As a phone's camera hands it over: 2000×1500 stored sideways (orientation 6), with a location.
	camera = await sharp({ create: { width: 2000, height: 1500, channels: 3, background: { r: 140, g: 120, b: 100 } } })
		.composite([{ input: { create: { width: 600, height: 300, channels: 3, background: '#1a1a1a' } }, left: 100, top: 100 }])
		.withMetadata({ orientation: 6 })
		.withExifMerge({ IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '51/1 30/1 0/1' } })
		.jpeg({ quality: 90 })
		.toBuffer();
	const source = await sharp(camera).metadata();
	expect(source.orientation).toBe(6);
	expect(source.exif!.toString('hex')).toMatch(/8825|2588/); // the GPS block's pointer is there
	phone = await openPhone();
	await signInAs(phone, base, TECH);
	await phone.page.waitForFunction(() => Boolean(navigator.serviceWorker.controller), null, { timeout: 20_000 });
});
afterEach(() => {
	expect(phone.errors, 'uncaught errors in the page').toEqual([]);
});
afterAll(async () => {
	await phone?.close();
	await desk?.close();
});

const badge = () => phone.page.getByTestId('sync-badge');

describe('evidence photos', () => {
	it('attaches a photo with no signal and still shows it after a reload offline', async () => {
		const { page, context } = phone;
		await page.goto(`${base}/field/job/${JOB}`);
		await page.getByTestId('complaint').waitFor({ timeout: 20_000 });
		await context.setOffline(true);
		await page.getByLabel('What the photo shows (optional)').fill('Melted fuse holder, slot 14');
		const [chooser] = await Promise.all([page.waitForEvent('filechooser'), page.getByTestId('add-photo').click()]);
		expect(await chooser.element().getAttribute('capture')).toBe('environment');
		await chooser.setFiles({ name: 'IMG_0001.jpg', mimeType: 'image/jpeg', buffer: camera });
		const item = page.getByTestId('photo-item');
		await expect.poll(() => item.getByTestId('photo-state').textContent(), { timeout: 15_000 }).toContain('Waiting to send');
		await expect.poll(() => badge().textContent()).toContain('1 waiting to send');
		// Shrunk on the phone and turned upright: 1200 wide, 1600 high.
		const size = () => item.locator('img').evaluate((img: HTMLImageElement) => [img.naturalWidth, img.naturalHeight]);
		await expect.poll(size).toEqual([1200, 1600]);
		expect(await axeViolations(page)).toEqual([]);
		await item.scrollIntoViewIfNeeded();
		await shot(page, 'photos-1-kept-offline');
		// A tap opens it full size; Close brings the job back.
		await item.getByRole('button', { name: /at full size/ }).click();
		const viewer = page.getByTestId('photo-viewer');
		await expect.poll(() => viewer.locator('img').evaluate((img: HTMLImageElement) => img.naturalWidth)).toBe(1200);
		expect(await axeViolations(page)).toEqual([]);
		await viewer.getByRole('button', { name: 'Close' }).click();
		await expect.poll(() => viewer.isVisible()).toBe(false);

		const answer = await page.reload();
		expect(answer?.fromServiceWorker(), 'the page came from the service worker').toBe(true);
		await expect.poll(() => item.getByTestId('photo-state').textContent(), { timeout: 15_000 }).toContain('Waiting to send');
		expect(await item.textContent()).toContain('Melted fuse holder, slot 14');
		await expect.poll(size).toEqual([1200, 1600]);
		// The sync screen says a photo waits.
		await badge().click();
		await page.getByTestId('photos-waiting').waitFor();
		expect(await page.getByTestId('photos-waiting').textContent()).toContain('1 photo waiting to send');
		await page.goto(`${base}/field/job/${JOB}`);
		await page.getByTestId('photo-item').waitFor();
	});

	it('sends it when the connection returns, and the lead sees it on the job', async () => {
		const { page, context } = phone;
		await context.setOffline(false);
		await expect.poll(() => page.getByTestId('photo-state').textContent(), { timeout: 30_000 }).toContain('Sent');
		await expect.poll(() => badge().textContent(), { timeout: 30_000 }).toContain('All sent');
		await shot(page, 'photos-2-sent');

		desk = await openAt('desk');
		await signInAs(desk, base, 'lead@tallowbridge.example');
		await desk.page.goto(`${base}/jobs/${JOB}`);
		const photo = desk.page.getByTestId('desk-photo');
		await photo.waitFor();
		expect(await photo.textContent()).toContain('Melted fuse holder, slot 14');
		await expect.poll(() => photo.locator('img').evaluate((img: HTMLImageElement) => img.naturalWidth)).toBeGreaterThan(0);
		const href = await photo.locator('a').getAttribute('href');
		const full = await desk.page.request.get(`${base}${href}`);
		expect(full.status()).toBe(200);
		const meta = await sharp(Buffer.from(await full.body())).metadata();
		expect([meta.format, meta.width, meta.height]).toEqual(['jpeg', 1200, 1600]);
		expect(meta.exif, 'no camera metadata (location) reaches the workshop').toBeUndefined();
		expect(await axeViolations(desk.page)).toEqual([]);
		expect(desk.errors).toEqual([]);
		await photo.scrollIntoViewIfNeeded();
		await shot(desk.page, 'photos-3-lead-desk');
	});
});
