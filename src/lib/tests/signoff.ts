/**
 * Where a test stands with its sign-off (DESIGN §2.7, §6): a test an apprentice started waits
 * for a workshop lead or owner, who signs it off — "witnessed" on their own phone beside the
 * apprentice, or "remote" from the desk after reading it — or sends it back with a note.
 * Pure and isomorphic: the server's rulebook, the office page, the phone, the overview and
 * the customer report all read the state from here.
 *
 * The latest decision counts (in feed order on the server; on a phone, in the order the
 * records reached the workshop, with what this phone has not sent yet last). A test sent
 * back waits again once readings are added to it after the send-back; a signed test stays
 * signed (a witnessed sign-off often reaches the workshop before the apprentice's readings).
 */

export const SIGNOFF_DECISIONS = ['signed', 'sent_back'] as const;
export type SignOffDecision = (typeof SIGNOFF_DECISIONS)[number];
export const SIGNOFF_MODES = ['witnessed', 'remote'] as const;
export type SignOffMode = (typeof SIGNOFF_MODES)[number];

/** One decision on a test; `order` is its place in the feed (higher is later). */
export type Decision = {
	decision: SignOffDecision;
	mode: SignOffMode;
	note: string | null;
	by: string | null;
	at: string | null;
	order: number;
};

/**
 * - `not_needed`: not an apprentice's test, or abandoned;
 * - `in_progress`: an apprentice's test not finished yet, nothing decided;
 * - `waiting`: finished and waiting for a lead (`sentBack`: the send-back it was changed after);
 * - `signed`: signed off (`last`: the sign-off);
 * - `sent_back`: sent back to the apprentice with a note (`last`).
 */
export type SignOffState =
	| { kind: 'not_needed' }
	| { kind: 'in_progress'; sentBack: Decision | null }
	| { kind: 'waiting'; sentBack: Decision | null }
	| { kind: 'signed'; last: Decision }
	| { kind: 'sent_back'; last: Decision };
export type SignOffKind = SignOffState['kind'];

/**
 * The state of one test. `decisions` are the test's sign-off decisions in any order;
 * `lastReading` is the order of its latest reading (null when it has none).
 */
export function signOffStateOf(
	test: { needsSignOff: boolean; state: string },
	decisions: readonly Decision[],
	lastReading: number | null
): SignOffState {
	if (!test.needsSignOff || test.state === 'abandoned') return { kind: 'not_needed' };
	const last = [...decisions].sort((a, b) => a.order - b.order).at(-1);
	if (last?.decision === 'signed') return { kind: 'signed', last };
	const changedSince = last && lastReading !== null && lastReading > last.order;
	if (last && !changedSince) return { kind: 'sent_back', last };
	const sentBack = last ?? null;
	return test.state === 'done' ? { kind: 'waiting', sentBack } : { kind: 'in_progress', sentBack };
}

/** Whether a test may go into a closed job and the customer's report: signed off or none needed. */
export const isSignedOff = (s: SignOffState | SignOffKind) => {
	const kind = typeof s === 'string' ? s : s.kind;
	return kind === 'signed' || kind === 'not_needed';
};

/** What each state is called on the badge (the product's words). */
export const SIGNOFF_TEXT: Record<SignOffKind, string> = {
	not_needed: '',
	in_progress: 'Sign-off after it is finished',
	waiting: 'Waiting for sign-off',
	signed: 'Signed off',
	sent_back: 'Sent back'
};

export const MODE_TEXT: Record<SignOffMode, string> = {
	witnessed: 'watched at the car',
	remote: 'read at the desk'
};
