/**
 * The shapes Fieldbench puts beside its words, so that nothing is told by colour alone. Each
 * shape means one thing everywhere in the app; a new meaning gets a new shape.
 */
export const SHAPE = {
	/** A result that is OK: within spec, a visual check found nothing, a spark that fires. */
	ok: '●',
	/** A result below what it should be: under spec, a weak spark. */
	low: '▼',
	/** A result above what it should be: over spec. */
	high: '▲',
	/** Nothing gets through: an open circuit (OL on the highest range), no spark. */
	none: '○',
	/** A fault seen by eye (a visual check that is not OK). */
	seen: '■',
	/** Can't tell yet: read again (too close to a limit, bad zero, over range, specs disagree). */
	cantTell: '◆',
	/** The sheet has no figure for this. */
	noFigure: '◇',
	/** Needs a person's attention: refused by the workshop, two edits clash, the odd one out. */
	attention: '⚑',
	/** Waiting to send to the workshop. */
	waiting: '◷',
	/** Done: saved, sent, finished, approved. */
	done: '✓',
	/** Not accepted: a field to fix, a refusal, a failed action. */
	no: '✕',
	/** A draft that may still change. */
	draft: '✎',
	/** A safety caution. */
	caution: '⚠',
	/** High voltage (hybrid or electric vehicle). */
	highVoltage: '⚡'
} as const;
export type ShapeName = keyof typeof SHAPE;
