/**
 * An office list page's list, with its state in the URL's query string (search, filters,
 * sort, page). Create it while the page's component initialises: it loads the list again
 * whenever the URL changes.
 */
import { page } from '$app/state';
import { RemoteList } from './remote-list.svelte';
import { hrefWith, paramsOfForm, showList } from './url-state';

export class UrlList<T> extends RemoteList<T> {
	/**
	 * `defaults` are the values the URL leaves out (the form does not write them);
	 * `firstSort` is the order the first tap on a column header asks for.
	 */
	constructor(
		endpoint: string,
		readonly defaults: { sort: string } & Record<string, string>,
		readonly firstSort: 'ascending' | 'descending' = 'ascending'
	) {
		super(endpoint);
		$effect(() => {
			this.load(page.url.searchParams);
		});
	}

	/** A query parameter, '' when the URL does not set it. */
	param = (key: string) => page.url.searchParams.get(key) ?? '';

	/** A filter's value: the URL's, else its default ('' when it has none). */
	value = (key: string) => this.param(key) || (this.defaults[key] ?? '');

	get sort(): string {
		return this.value('sort');
	}

	/** The filter form's submit: its fields become the query string (a new history entry). */
	apply = (e: SubmitEvent) => {
		e.preventDefault();
		showList(paramsOfForm(e.currentTarget as HTMLFormElement, this.defaults));
	};

	submitOnChange = (e: Event) => (e.currentTarget as HTMLSelectElement).form?.requestSubmit();

	/** Column header link: sort by `key`, the second tap reverses. */
	sortHref = (key: string) => {
		const [first, second] = this.firstSort === 'ascending' ? [key, `-${key}`] : [`-${key}`, key];
		return hrefWith(page.url, { sort: this.sort === first ? second : first, page: null });
	};

	ariaSort = (key: string) =>
		this.sort === key ? 'ascending' : this.sort === `-${key}` ? 'descending' : undefined;
}
