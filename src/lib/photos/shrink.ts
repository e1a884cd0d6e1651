/**
 * The size a photo is kept at on the phone (pure): the longest side at most `max` pixels,
 * the proportions kept, never enlarged.
 */
export function fitWithin(width: number, height: number, max: number): { width: number; height: number } {
	const long = Math.max(width, height);
	if (long <= max) return { width, height };
	const k = max / long;
	return { width: Math.max(1, Math.round(width * k)), height: Math.max(1, Math.round(height * k)) };
}

/** Room a phone must have left before a photo is taken, in bytes (a shrunk photo is 0.3–1 MB). */
export const PHOTO_ROOM_BYTES = 20 * 1024 * 1024;

/**
 * Whether the phone has room for another photo, from the browser's storage estimate; the
 * refusal in words, or null (also when the browser gives no estimate).
 */
export function refuseForStorage(estimate: { usage?: number; quota?: number } | null): string | null {
	if (!estimate?.quota) return null;
	const free = estimate.quota - (estimate.usage ?? 0);
	return free < PHOTO_ROOM_BYTES
		? 'This phone’s storage is nearly full, so the photo could not be kept. Send what is waiting with signal, or free some space, then try again.'
		: null;
}

/** What the phone says about an upload the workshop refused, by the answer's status and code. */
export function uploadProblemWords(status: number, code?: string): string {
	if (status === 413) return 'Too large for the workshop (over 10 MB)';
	if (status === 415) return 'Not a picture the workshop takes (JPEG, PNG or WebP)';
	if (status === 404) return 'The job is no longer yours, so the workshop did not take it';
	if (status === 409) return 'The workshop already has another photo under this name';
	if (code === 'wrong_place') return 'The test or reading it was taken for is not on the workshop';
	if (code === 'unreadable_image') return 'The picture could not be opened; take it again';
	return 'The workshop did not take this photo';
}
