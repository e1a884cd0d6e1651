/** Tables of the append-only entities (each row carries its op id and feed seq). */
export const APPEND_TABLES = {
	reading: 'readings',
	spark_test: 'spark_tests',
	swap_test: 'swap_tests',
	signoff: 'signoffs'
} as const;
export type StoredAppendEntity = keyof typeof APPEND_TABLES;
