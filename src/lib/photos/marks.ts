/**
 * What a photo's marks mean (pure, shared by the phone and the server). Marks are
 * append-only records: `removed` hides the photo for good (a tombstone), `for_customer` and
 * `not_for_customer` say whether the customer report shows it — the latest of those two in
 * feed order counts.
 */
import { isLead, type Role } from '../roles';

export const PHOTO_MARKS = ['removed', 'for_customer', 'not_for_customer'] as const;
export type PhotoMark = (typeof PHOTO_MARKS)[number];

/** The largest photo the workshop accepts, in bytes (10 MB). */
export const MAX_PHOTO_BYTES = 10 * 1024 * 1024;
/** The longest side of a photo as the phone keeps it, in pixels. */
export const PHOTO_LONG_SIDE = 1600;

export type PhotoState = { removed: boolean; forCustomer: boolean };

/** Each photo's state from its marks (in feed order; `order` sorts them when given). */
export function photoStates(
	marks: { photoId: string; mark: string; order?: number }[]
): Map<string, PhotoState> {
	const out = new Map<string, PhotoState>();
	const sorted = marks.some((m) => m.order != null)
		? [...marks].sort((a, b) => (a.order ?? 0) - (b.order ?? 0))
		: marks;
	for (const m of sorted) {
		const s = out.get(m.photoId) ?? { removed: false, forCustomer: false };
		if (m.mark === 'removed') s.removed = true;
		else if (m.mark === 'for_customer') s.forCustomer = true;
		else if (m.mark === 'not_for_customer') s.forCustomer = false;
		out.set(m.photoId, s);
	}
	return out;
}

/**
 * Who may mark a photo: the person who took it or a workshop lead or owner (who may also
 * choose it for the customer). The refusal in words, or null.
 */
export function refusePhotoMark(
	who: { userId: string; role: Role },
	photo: { createdBy: string },
	mark: PhotoMark
): string | null {
	if (isLead(who) || photo.createdBy === who.userId) return null;
	return mark === 'removed'
		? 'Only the person who took the photo or a workshop lead can remove it'
		: 'Only the person who took the photo or a workshop lead can choose it for the customer';
}
