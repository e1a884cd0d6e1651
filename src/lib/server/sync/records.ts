/** The public record of an append-only row, as the pull sends it (camelCase, parsed JSON). */
import { parseNumbers } from '../../sync/json';

const camel = (s: string) => s.replace(/_([a-z])/g, (_m, c: string) => c.toUpperCase());
const JSON_COLUMNS = new Set(['samples', 'visual', 'device_result', 'server_result', 'before_counts', 'after_counts']);
const HIDDEN = new Set(['workshop_id', 'op_id', 'seq']);

export function appendRecord(entity: string, row: Record<string, unknown>): Record<string, unknown> {
	const out: Record<string, unknown> = { entity };
	for (const [k, v] of Object.entries(row)) {
		if (HIDDEN.has(k)) continue;
		out[camel(k)] = JSON_COLUMNS.has(k) && typeof v === 'string' ? parseNumbers(v) : k === 'mismatch' ? Boolean(v) : k === 'gap_mm' ? Number(v) : v;
	}
	out.version = 1;
	return out;
}
