/**
 * The browser the end-to-end tests drive: Debian's Chromium at /usr/bin/chromium, or the
 * executable named by CHROMIUM_PATH. `npm test` calls `ensureChromium()` first; like
 * `ensureInstalled()` in mariadb.ts for MariaDB, it installs Debian's `chromium` package with
 * apt-get when the browser is missing and we are root, and otherwise stops with the exact
 * command to run. It never downloads a browser of its own.
 *
 * Decisions, in order:
 *  1. the wanted executable exists → use it;
 *  2. CHROMIUM_PATH names another path that does not exist → stop (installing Debian's
 *     package would not create that path);
 *  3. not root → stop with the command to run as root;
 *  4. root → `apt-get update`, `apt-get install -y chromium`, then check the path again.
 */
import { accessSync, constants } from 'node:fs';
import { execFileSync } from 'node:child_process';

export const DEBIAN_CHROMIUM = '/usr/bin/chromium';
export const INSTALL_COMMAND = 'apt-get update && apt-get install -y chromium';

/**
 * The switches every headless Chromium of the project starts with (the end-to-end tests, the
 * README's screenshots, the Lighthouse bench): no sandbox (containers, root), no GPU, no QUIC,
 * and none of the browser's own background traffic.
 */
export const CHROMIUM_ARGS = [
	'--no-sandbox',
	'--disable-gpu',
	'--disable-quic',
	'--no-first-run',
	'--disable-background-networking',
	'--disable-component-update',
	'--disable-sync'
];

/** What `ensureChromium` needs from the machine; the tests pass their own. */
export interface Machine {
	/** Whether `path` is an executable file. */
	executable(path: string): boolean;
	isRoot: boolean;
	/** Run a command to completion; throws when it fails. */
	run(command: string, args: string[]): void;
	log(message: string): void;
}

export const thisMachine: Machine = {
	executable(path) {
		try {
			accessSync(path, constants.X_OK);
			return true;
		} catch {
			return false;
		}
	},
	isRoot: process.getuid?.() === 0,
	run(command, args) {
		execFileSync(command, args, {
			stdio: 'inherit',
			env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' }
		});
	},
	log: (message) => console.log(message)
};

/** The executable the end-to-end tests launch. */
export function chromiumPath(env: NodeJS.ProcessEnv = process.env): string {
	return env.CHROMIUM_PATH || DEBIAN_CHROMIUM;
}

/** Make sure the browser is there (installing Debian's package when needed); its path. */
export function ensureChromium(
	env: NodeJS.ProcessEnv = process.env,
	machine: Machine = thisMachine
): string {
	const wanted = chromiumPath(env);
	if (machine.executable(wanted)) return wanted;
	if (wanted !== DEBIAN_CHROMIUM) {
		throw new Error(
			`CHROMIUM_PATH is ${wanted}, and there is no browser there. Point it at a Chromium, ` +
				`or leave it unset to use Debian's (${DEBIAN_CHROMIUM}, installed when missing).`
		);
	}
	if (!machine.isRoot) {
		throw new Error(
			`Chromium is not installed (${DEBIAN_CHROMIUM}); the end-to-end tests drive it. ` +
				`Run as root:  ${INSTALL_COMMAND}`
		);
	}
	machine.log('Installing chromium from Debian packages…');
	machine.run('apt-get', ['update', '-qq']);
	machine.run('apt-get', ['install', '-y', '-qq', 'chromium']);
	if (!machine.executable(wanted)) {
		throw new Error(`apt-get installed chromium, but ${wanted} is still missing.`);
	}
	return wanted;
}
