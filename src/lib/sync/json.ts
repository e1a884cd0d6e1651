/** JSON that keeps ±Infinity (an OL reading is Infinity): written as the strings below. */
export const stringifyNumbers = (v: unknown) =>
	JSON.stringify(v, (_k, x) => (x === Infinity ? 'Infinity' : x === -Infinity ? '-Infinity' : x));

/** Reverse of `stringifyNumbers`. */
export const parseNumbers = <T = unknown>(s: string): T =>
	JSON.parse(s, (_k, x) => (x === 'Infinity' ? Infinity : x === '-Infinity' ? -Infinity : x));
