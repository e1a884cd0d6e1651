/** What the library editors share when they save: sending JSON and pointing at the problems. */
import { tick } from 'svelte';

/**
 * Send `body` as JSON; the answer's status and body ({} when it is not JSON). A 401 sends the
 * browser to sign-in and back to this page.
 */
export async function sendJson(method: string, url: string, body: unknown) {
	const r = await fetch(url, {
		method,
		headers: { 'content-type': 'application/json', accept: 'application/json' },
		body: JSON.stringify(body)
	});
	if (r.status === 401) location.assign(`/sign-in?next=${encodeURIComponent(location.pathname)}`);
	return { ok: r.ok, status: r.status, body: await r.json().catch(() => ({})) };
}

/** After the page shows the field messages, move the focus to the first field that has one. */
export async function focusFirstProblem() {
	await tick();
	document.querySelector<HTMLElement>('[aria-invalid="true"]')?.focus();
}
