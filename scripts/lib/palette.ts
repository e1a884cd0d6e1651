/**
 * The product's palette as `src/app.css` defines it (`--color-*` tokens in `@theme`), for
 * the files that cannot read CSS: the web app manifest (vite.config.ts) and the icons
 * (scripts/make-icons.ts). One source, so the installed app's colours never drift.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const APP_CSS = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../src/app.css');

/** Every `--color-NAME: #rrggbb` token, keyed by NAME (e.g. `ink`, `paper`, `signal`). */
export function readPalette(css = readFileSync(APP_CSS, 'utf8')): Record<string, string> {
	const theme = css.match(/@theme\s*{([^}]*)}/)?.[1] ?? '';
	const out: Record<string, string> = {};
	for (const m of theme.matchAll(/--color-([a-z-]+):\s*(#[0-9a-f]{6})\b/gi))
		out[m[1]] = m[2].toLowerCase();
	if (!out.ink || !out.paper) throw new Error(`no --color-ink or --color-paper in ${APP_CSS}`);
	return out;
}
