/** The URL query string as the state of a list page. */
import { goto } from '$app/navigation';

/**
 * The query string for a filter form: empty values and values equal to their default are
 * left out (so the URL stays short), and the page goes back to 1.
 */
export function paramsOfForm(form: HTMLFormElement, defaults: Record<string, string> = {}) {
	const p = new URLSearchParams();
	for (const [k, v] of new FormData(form)) {
		if (typeof v !== 'string' || v.trim() === '' || defaults[k] === v || k === 'page') continue;
		p.set(k, v.trim());
	}
	return p;
}

/** Navigate to the list with these parameters (a new history entry, so back works). */
export function showList(params: URLSearchParams) {
	const qs = params.toString();
	return goto(qs ? `?${qs}` : '?', { keepFocus: true, noScroll: true });
}

/** The current query string with some parameters changed (null removes one). */
export function hrefWith(url: URL, changes: Record<string, string | number | null>): string {
	const p = new URLSearchParams(url.searchParams);
	for (const [k, v] of Object.entries(changes)) {
		if (v === null || v === '') p.delete(k);
		else p.set(k, String(v));
	}
	const qs = p.toString();
	return qs ? `?${qs}` : url.pathname;
}
