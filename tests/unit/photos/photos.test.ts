/**
 * The pure parts of evidence photos: the phone's target size (checked against sharp's own
 * `fit: 'inside'` resize, libvips), the storage check before a photo, the words for a refused
 * upload, what marks mean, who may mark, and the type sniffing by content (against pictures
 * sharp writes in each format; signatures per JPEG ITU-T T.81 Annex B, PNG ISO/IEC 15948 §5.2,
 * WebP's RIFF container).
 */
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { photoStates, refusePhotoMark } from '../../../src/lib/photos/marks';
import { fitWithin, PHOTO_ROOM_BYTES, refuseForStorage, uploadProblemWords } from '../../../src/lib/photos/shrink';
import { sniffImageType } from '../../../src/lib/server/photos/service';

const blank = (width: number, height: number) =>
	sharp({ create: { width, height, channels: 3, background: '#808080' } });

describe('fitWithin (longest side 1,600 px)', () => {
	it.each([
		[4032, 3024],
		[3024, 4032],
		[1600, 1200],
		[800, 600],
		[4000, 1000],
		[1601, 1601]
	])('%i×%i gives what sharp gives for fit inside 1600', async (w, h) => {
		const ref = await blank(w, h).resize(1600, 1600, { fit: 'inside', withoutEnlargement: true }).jpeg().toBuffer({ resolveWithObject: true });
		expect(fitWithin(w, h, 1600)).toEqual({ width: ref.info.width, height: ref.info.height });
	});
});

describe('storage before a photo', () => {
	it('refuses when less than the room a photo needs is left, in words', () => {
		expect(refuseForStorage({ quota: 1e9, usage: 1e9 - PHOTO_ROOM_BYTES + 1 })).toMatch(/storage is nearly full/);
		expect(refuseForStorage({ quota: 1e9, usage: 1e9 - PHOTO_ROOM_BYTES })).toBeNull();
		expect(refuseForStorage(null)).toBeNull();
		expect(refuseForStorage({})).toBeNull();
	});
	it('says why the workshop refused an upload without codes', () => {
		expect(uploadProblemWords(413)).toMatch(/10 MB/);
		expect(uploadProblemWords(415)).toMatch(/JPEG, PNG or WebP/);
		expect(uploadProblemWords(400, 'unreadable_image')).not.toMatch(/_/);
	});
});

describe('marks', () => {
	it('hides a removed photo for good; the latest customer choice counts', () => {
		const s = photoStates([
			{ photoId: 'a', mark: 'for_customer', order: 1 },
			{ photoId: 'b', mark: 'for_customer', order: 2 },
			{ photoId: 'a', mark: 'not_for_customer', order: 3 },
			{ photoId: 'b', mark: 'removed', order: 4 },
			{ photoId: 'c', mark: 'not_for_customer', order: 6 },
			{ photoId: 'c', mark: 'for_customer', order: 5 }
		]);
		expect(s.get('a')).toEqual({ removed: false, forCustomer: false });
		expect(s.get('b')).toEqual({ removed: true, forCustomer: true });
		expect(s.get('c')).toEqual({ removed: false, forCustomer: false });
	});
	it('lets the person who took it or a lead mark it, nobody else', () => {
		const photo = { createdBy: 'u1' };
		expect(refusePhotoMark({ userId: 'u1', role: 'apprentice' }, photo, 'removed')).toBeNull();
		expect(refusePhotoMark({ userId: 'u2', role: 'lead' }, photo, 'for_customer')).toBeNull();
		expect(refusePhotoMark({ userId: 'u3', role: 'owner' }, photo, 'removed')).toBeNull();
		expect(refusePhotoMark({ userId: 'u4', role: 'technician' }, photo, 'removed')).toMatch(/took the photo or a workshop lead/);
	});
});

describe('sniffImageType (by content)', () => {
	it('knows JPEG, PNG and WebP as sharp writes them', async () => {
		expect(sniffImageType(await blank(8, 8).jpeg().toBuffer())?.type).toBe('image/jpeg');
		expect(sniffImageType(await blank(8, 8).png().toBuffer())?.type).toBe('image/png');
		expect(sniffImageType(await blank(8, 8).webp().toBuffer())?.type).toBe('image/webp');
	});
	it('refuses GIF, TIFF, text and a JPEG signature cut short', async () => {
		expect(sniffImageType(await blank(8, 8).gif().toBuffer())).toBeNull();
		expect(sniffImageType(await blank(8, 8).tiff().toBuffer())).toBeNull();
		expect(sniffImageType(Buffer.from('<svg xmlns="http://www.w3.org/2000/svg"/>'))).toBeNull();
		expect(sniffImageType(Buffer.from([0xff, 0xd8]))).toBeNull();
	});
});
