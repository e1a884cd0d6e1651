/**
 * Small helpers for the server-side lists (search, filter, sort, paging) of jobs, customers
 * and vehicles: a WHERE clause built from parts with `?` replacements, a LIKE pattern, and
 * one page of ids plus the total.
 */
import { QueryTypes } from 'sequelize';
import { db } from '../db';

/** A WHERE clause under construction: each part with its replacements. */
export class Where {
	parts: string[] = [];
	params: unknown[] = [];

	/** Add `sql` (with `?` placeholders for `params`), AND-ed with the rest. */
	and(sql: string, ...params: unknown[]): this {
		this.parts.push(sql);
		this.params.push(...params);
		return this;
	}

	/** Add `(a OR b OR …)`, every alternative with the same single parameter. */
	anyOf(columns: string[], param: unknown): this {
		return this.and(`(${columns.join(' OR ')})`, ...columns.map(() => param));
	}

	get sql(): string {
		return this.parts.length ? `WHERE ${this.parts.join(' AND ')}` : '';
	}
}

/** `%text%` for LIKE, with LIKE's own wildcards escaped. */
export function likeOf(text: string): string {
	return `%${text.replace(/[%_\\]/g, '\\$&')}%`;
}

/** An ORDER BY from `key` or `-key`, with `tiebreak` keeping pages stable. */
export function orderBy(sort: string, columns: Record<string, string>, tiebreak: string): string {
	const desc = sort.startsWith('-');
	const col = columns[desc ? sort.slice(1) : sort];
	const dir = desc ? 'DESC' : 'ASC';
	return `ORDER BY ${col} ${dir}, ${tiebreak} ${dir}`;
}

/**
 * Run `SELECT <id> FROM <from> <where> <order>` for one page, and the count of all matches.
 * `from` is trusted SQL (table and joins); every value goes through replacements.
 */
export async function pageOfIds(
	idColumn: string,
	from: string,
	where: Where,
	order: string,
	page: number,
	pageSize: number
): Promise<{ ids: string[]; total: number }> {
	const s = db();
	const [count] = await s.query<{ n: number | bigint }>(
		`SELECT COUNT(*) AS n FROM ${from} ${where.sql}`,
		{ replacements: where.params, type: QueryTypes.SELECT }
	);
	const rows = await s.query<{ id: string }>(
		`SELECT ${idColumn} AS id FROM ${from} ${where.sql} ${order} LIMIT ? OFFSET ?`,
		{
			replacements: [...where.params, pageSize, (page - 1) * pageSize],
			type: QueryTypes.SELECT
		}
	);
	return { ids: rows.map((r) => r.id), total: Number(count?.n ?? 0) };
}

/** `rows` in the order of `ids` (the page's sort order). */
export function inOrder<T extends { id: string }>(ids: string[], rows: T[]): T[] {
	const byId = new Map(rows.map((r) => [r.id, r]));
	return ids.map((id) => byId.get(id)).filter((r): r is T => r !== undefined);
}
