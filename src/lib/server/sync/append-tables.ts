/** Tables of the append-only entities (each row carries its op id and feed seq). */
export const APPEND_TABLES = {
	reading: 'readings',
	spark_test: 'spark_tests',
	swap_test: 'swap_tests',
	signoff: 'signoffs'
} as const;
export type StoredAppendEntity = keyof typeof APPEND_TABLES;
export type AppendTable = (typeof APPEND_TABLES)[StoredAppendEntity];

/** `items` grouped by their table (items with none are left out), each group in order. */
export function groupByTable<T, V>(
	items: Iterable<T>,
	tableOf: (item: T) => AppendTable | undefined,
	value: (item: T) => V
): Map<AppendTable, V[]> {
	const groups = new Map<AppendTable, V[]>();
	for (const item of items) {
		const table = tableOf(item);
		if (!table) continue;
		const list = groups.get(table);
		if (list) list.push(value(item));
		else groups.set(table, [value(item)]);
	}
	return groups;
}
