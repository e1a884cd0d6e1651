/**
 * What the technician has typed but not saved, per test, kept in localStorage on every key
 * so a reload (or the phone killing the tab) in the middle of a reading loses nothing; with
 * the caution sets already acknowledged in this test.
 */
import type { CellDraft } from '$lib/flow/capture';

export type { CellDraft };
export type TestDraft = { index: number; cells: Record<string, CellDraft>; acked: string[] };

const key = (testId: string) => `fieldbench:draft:${testId}`;

export function loadDraft(testId: string): TestDraft {
	try {
		const raw = localStorage.getItem(key(testId));
		if (raw) {
			const d = JSON.parse(raw) as Partial<TestDraft>;
			return { index: d.index ?? 0, cells: d.cells ?? {}, acked: d.acked ?? [] };
		}
	} catch {
		/* a broken draft is dropped */
	}
	return { index: 0, cells: {}, acked: [] };
}

export function saveDraft(testId: string, draft: TestDraft) {
	localStorage.setItem(key(testId), JSON.stringify(draft));
}
