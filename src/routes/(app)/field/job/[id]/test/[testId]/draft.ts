/**
 * What the technician has typed but not saved, per test, kept in localStorage on every key
 * so a reload (or the phone killing the tab) in the middle of a reading loses nothing.
 */
import type { Sample } from '$lib/flow/reading';

export type CellDraft = { entry: string; unit: string; samples: Sample[]; rangeLabel: string };
export type TestDraft = { index: number; cells: Record<string, CellDraft> };

const key = (testId: string) => `fieldbench:draft:${testId}`;

export function loadDraft(testId: string): TestDraft {
	try {
		const raw = localStorage.getItem(key(testId));
		if (raw) return JSON.parse(raw) as TestDraft;
	} catch {
		/* a broken draft is dropped */
	}
	return { index: 0, cells: {} };
}

export function saveDraft(testId: string, draft: TestDraft) {
	localStorage.setItem(key(testId), JSON.stringify(draft));
}
