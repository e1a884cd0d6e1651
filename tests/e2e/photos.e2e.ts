/**
 * Evidence photos end to end at 390×844: a technician attaches a photo with no signal
 * (through the file chooser, as the camera or gallery hands it over), reloads the page
 * offline and still sees it, adds a photo to one reading of a test on the test screen (still
 * offline), goes online and sees both sent; the lead then sees them on the job's desk page
 * (the reading's beside that reading) and opens one full size. The photo that reaches the workshop is the one the
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
import { v7 as uuidv7 } from 'uuid';
import { openAt, openPhone, shot, signInAs } from './browser';
import { syncPhone } from './phone-steps';

const base = inject('baseURL');
const TECH = 'photos-tech@tallowbridge.example';
let JOB = '';
const TEST = uuidv7();
const READING = uuidv7();
const COIL = '019a0000-0000-7000-8000-000000000401'; // the demo coil and its approved sheet
const SHEET = '019a0000-0000-7000-8000-000000000501';
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
		// A test of the job with one reading taken, as another phone of the technician sent it.
		const now = new Date().toISOString();
		const op = (entity: string, entityId: string, fields: object) => ({ opId: uuidv7(), entity, entityId, kind: 'create', baseVersion: 0, deviceTime: now, fields });
		const pushed = await phone.page.request.post(`${base}/api/sync/push`, {
			data: {
				deviceId: uuidv7(),
				ops: [
					op('test', TEST, {
						jobId: JOB,
						componentId: COIL,
						sheetId: SHEET,
						partNumber: 'TB-IC-2041',
						position: '1',
						meter: { name: 'Bench meter', ranges: [{ label: '200 Ω', resolution: 0.01, pctOfReading: 0.5, counts: 2 }], leadResistance: 0.2, relativeMode: false },
						temperature: { mode: 'overnight' }
					}),
					op('reading', READING, { testId: TEST, checkKey: 'primary', position: '1', samples: [{ value: 0.64, unit: 'Ω' }], rangeLabel: '200 Ω' })
				]
			}
		});
		expect((await pushed.json()).results.map((x: { status: string }) => x.status)).toEqual(['applied', 'applied']);
		await syncPhone(phone.page, base);
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

	it('adds a photo to one reading on the test screen, still offline, shown beside that reading', async () => {
		const { page } = phone;
		await page.goto(`${base}/field/job/${JOB}/test/${TEST}`);
		await page.locator('button[aria-controls="checks"]').click();
		await page.getByRole('button', { name: 'Results', exact: true }).click();
		const reading = page.getByTestId('reading-with-photos').filter({ has: page.locator(`[data-reading="${READING}"]`) });
		await reading.waitFor({ timeout: 15_000 });
		const add = reading.getByTestId('add-reading-photo');
		expect(await add.getAttribute('data-testid')).toBe('add-reading-photo');
		await reading.getByRole('button', { name: /^Add photo of / }).waitFor();
		expect((await add.boundingBox())!.height, 'a glove-sized target').toBeGreaterThanOrEqual(56);
		const [chooser] = await Promise.all([page.waitForEvent('filechooser'), add.click()]);
		expect(await chooser.element().getAttribute('capture')).toBe('environment');
		await chooser.setFiles({ name: 'IMG_0002.jpg', mimeType: 'image/jpeg', buffer: camera });
		const item = reading.getByTestId('reading-photo');
		await expect.poll(() => item.getByTestId('photo-state').textContent(), { timeout: 15_000 }).toContain('Waiting to send');
		await expect.poll(() => badge().textContent()).toContain('2 waiting to send');
		await expect.poll(() => item.locator('img').evaluate((img: HTMLImageElement) => img.naturalWidth)).toBe(1200);
		expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
		expect(await axeViolations(page)).toEqual([]);
		await item.scrollIntoViewIfNeeded();
		await shot(page, 'photos-1b-reading-offline');
		// The test's own photos leave it out: it shows beside its reading.
		expect(await page.getByTestId('field-photos').getByTestId('photo-item').count()).toBe(0);
		await item.getByRole('button', { name: /at full size/ }).click();
		const viewer = page.getByTestId('photo-viewer').filter({ visible: true });
		await expect.poll(() => viewer.locator('img').evaluate((img: HTMLImageElement) => img.naturalWidth)).toBe(1200);
		await viewer.getByRole('button', { name: 'Close' }).click();
		await page.goto(`${base}/field/job/${JOB}`);
		await expect.poll(() => page.getByTestId('photo-item').count()).toBe(2);
		// The job's test display shows it beside the reading too.
		await expect.poll(() => page.locator(`[data-reading="${READING}"]`).getByTestId('reading-photo').count()).toBe(1);
	});

	it('sends it when the connection returns, and the lead sees it on the job', async () => {
		const { page, context } = phone;
		await context.setOffline(false);
		await expect
			.poll(async () => (await page.getByTestId('photo-state').allTextContents()).every((t) => t.includes('Sent')), { timeout: 30_000 })
			.toBe(true);
		await expect.poll(() => badge().textContent(), { timeout: 30_000 }).toContain('All sent');
		await page.getByTestId('photo-item').first().scrollIntoViewIfNeeded();
		await shot(page, 'photos-2-sent');

		desk = await openAt('desk');
		await signInAs(desk, base, 'lead@tallowbridge.example');
		await desk.page.goto(`${base}/jobs/${JOB}`);
		const photo = desk.page.getByTestId('desk-photo').filter({ hasText: 'Melted fuse holder, slot 14' });
		await photo.waitFor();
		expect(await photo.textContent()).toContain('Melted fuse holder, slot 14');
		await photo.scrollIntoViewIfNeeded(); // thumbnails load lazily, below the job's tests
		await expect.poll(() => photo.locator('img').evaluate((img: HTMLImageElement) => img.naturalWidth)).toBeGreaterThan(0);
		const href = await photo.locator('a').getAttribute('href');
		const full = await desk.page.request.get(`${base}${href}`);
		expect(full.status()).toBe(200);
		const meta = await sharp(Buffer.from(await full.body())).metadata();
		expect([meta.format, meta.width, meta.height]).toEqual(['jpeg', 1200, 1600]);
		expect(meta.exif, 'no camera metadata (location) reaches the workshop').toBeUndefined();
		// The reading's photo among the job's, captioned with the part and the reading …
		expect(await desk.page.getByTestId('desk-photo').filter({ hasText: 'TB-IC-2041, Primary winding' }).count()).toBe(1);
		// … and beside that reading in the test's display.
		const beside = desk.page.locator(`#test-${TEST}`).getByTestId('desk-reading-photos');
		await beside.waitFor();
		await beside.scrollIntoViewIfNeeded();
		await expect.poll(() => beside.locator('img').evaluate((img: HTMLImageElement) => img.naturalWidth)).toBeGreaterThan(0);
		expect(await beside.locator('a').getAttribute('href')).toMatch(/\/file\?size=full$/);
		expect(await axeViolations(desk.page)).toEqual([]);
		expect(desk.errors).toEqual([]);
		await photo.scrollIntoViewIfNeeded();
		await shot(desk.page, 'photos-3-lead-desk');
	});
});
