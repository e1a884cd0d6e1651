/**
 * A list fetched from the JSON API in the browser. The URL's query string is the list's
 * state (search, filters, sort, page), so reload and back give the same list; `load` is
 * called again whenever the URL changes. A late answer to an older URL is dropped.
 */
export type ListState = 'loading' | 'ready' | 'error';

export class RemoteList<T> {
	state = $state<ListState>('loading');
	items = $state<T[]>([]);
	total = $state(0);
	page = $state(1);
	pageSize = $state(20);
	/** The API's message when it refused the query (e.g. a filter it cannot read). */
	problem = $state<string | null>(null);
	/** Whether an answer has arrived yet (the items are the latest one's). */
	answered = $state(false);
	#ticket = 0;

	constructor(
		readonly endpoint: string,
		readonly defaultPageSize = 20
	) {}

	/** Fetch the page the query string `search` describes. */
	async load(search: URLSearchParams): Promise<void> {
		const ticket = ++this.#ticket;
		const params = new URLSearchParams(search);
		if (!params.has('pageSize')) params.set('pageSize', String(this.defaultPageSize));
		this.state = 'loading';
		try {
			const r = await fetch(`${this.endpoint}?${params}`, {
				headers: { accept: 'application/json' }
			});
			if (ticket !== this.#ticket) return;
			if (r.status === 401) {
				location.assign(`/sign-in?next=${encodeURIComponent(location.pathname + location.search)}`);
				return;
			}
			const body = await r.json();
			if (ticket !== this.#ticket) return;
			if (!r.ok) {
				const fields = Object.entries(body?.error?.fields ?? {}).map(([k, v]) => `${k}: ${v}`);
				this.problem = fields.length ? fields.join('; ') : (body?.error?.message ?? null);
				this.state = 'error';
				return;
			}
			this.items = body.items;
			this.total = body.total;
			this.page = body.page;
			this.pageSize = body.pageSize;
			this.problem = null;
			this.answered = true;
			this.state = 'ready';
		} catch {
			if (ticket !== this.#ticket) return;
			this.problem = null;
			this.state = 'error';
		}
	}

	get pages(): number {
		return Math.max(1, Math.ceil(this.total / this.pageSize));
	}
}
