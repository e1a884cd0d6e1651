/**
 * The product's palette as `src/app.css` defines it (`--color-*` tokens in `@theme`), for
 * the files that cannot read CSS: the web app manifest (vite.config.ts) and the icons
 * (scripts/make-icons.ts). One source, so the installed app's colours never drift.
 * (Plain JavaScript, so that vite.config.ts imports it with its extension.)
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const APP_CSS = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../src/app.css');

/**
 * Every `--color-NAME: #rrggbb` token, keyed by NAME (e.g. `ink`, `paper`, `signal`).
 * @param {string} [css] the stylesheet's text (src/app.css when left out)
 * @returns {Record<string, string>}
 */
export function readPalette(css = readFileSync(APP_CSS, 'utf8')) {
	const theme = css.match(/@theme\s*{([^}]*)}/)?.[1] ?? '';
	/** @type {Record<string, string>} */
	const out = {};
	for (const m of theme.matchAll(/--color-([a-z-]+):\s*(#[0-9a-f]{6})\b/gi))
		out[m[1]] = m[2].toLowerCase();
	if (!out.ink || !out.paper) throw new Error(`no --color-ink or --color-paper in ${APP_CSS}`);
	return out;
}
