import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import {
	DEBIAN_CHROMIUM,
	INSTALL_COMMAND,
	chromiumPath,
	ensureChromium,
	thisMachine,
	type Machine
} from '../../../scripts/lib/chromium';

/** A machine whose files and root status the test decides; installing creates the browser. */
function fakeMachine(opts: { present?: string[]; isRoot: boolean; installWorks?: boolean }) {
	const files = new Set(opts.present ?? []);
	const ran: string[] = [];
	const machine: Machine = {
		executable: (p) => files.has(p),
		isRoot: opts.isRoot,
		run(command, args) {
			ran.push([command, ...args].join(' '));
			if (command === 'apt-get' && args.includes('install') && opts.installWorks !== false) {
				files.add(DEBIAN_CHROMIUM);
			}
		},
		log: () => {}
	};
	return { machine, ran };
}

describe('finding the browser for the end-to-end tests', () => {
	it("uses Debian's Chromium unless CHROMIUM_PATH names another", () => {
		expect(chromiumPath({})).toBe('/usr/bin/chromium');
		expect(chromiumPath({ CHROMIUM_PATH: '' })).toBe('/usr/bin/chromium');
		expect(chromiumPath({ CHROMIUM_PATH: '/opt/chromium/chrome' })).toBe('/opt/chromium/chrome');
	});

	it('installs nothing when the browser is there', () => {
		const { machine, ran } = fakeMachine({ present: [DEBIAN_CHROMIUM], isRoot: true });
		expect(ensureChromium({}, machine)).toBe(DEBIAN_CHROMIUM);
		expect(ran).toEqual([]);
	});

	it("installs Debian's chromium package with apt-get when missing and root", () => {
		const { machine, ran } = fakeMachine({ isRoot: true });
		expect(ensureChromium({}, machine)).toBe(DEBIAN_CHROMIUM);
		expect(ran).toEqual(['apt-get update -qq', 'apt-get install -y -qq chromium']);
	});

	it('names the exact command to run when missing and not root', () => {
		const { machine, ran } = fakeMachine({ isRoot: false });
		expect(() => ensureChromium({}, machine)).toThrow(
			'Run as root:  apt-get update && apt-get install -y chromium'
		);
		expect(INSTALL_COMMAND).toBe('apt-get update && apt-get install -y chromium');
		expect(ran).toEqual([]);
	});

	it('says so when the package installed but the browser is still not there', () => {
		const { machine } = fakeMachine({ isRoot: true, installWorks: false });
		expect(() => ensureChromium({}, machine)).toThrow('still missing');
	});

	it('stops an apt-get failure instead of going on without a browser', () => {
		const { machine } = fakeMachine({ isRoot: true });
		machine.run = () => {
			throw new Error('apt-get: Could not get lock');
		};
		expect(() => ensureChromium({}, machine)).toThrow('Could not get lock');
	});

	it('uses a CHROMIUM_PATH that exists, and never installs for one that does not', () => {
		const custom = '/opt/chromium/chrome';
		const there = fakeMachine({ present: [custom], isRoot: true });
		expect(ensureChromium({ CHROMIUM_PATH: custom }, there.machine)).toBe(custom);
		const missing = fakeMachine({ isRoot: true });
		expect(() => ensureChromium({ CHROMIUM_PATH: custom }, missing.machine)).toThrow(
			'CHROMIUM_PATH is /opt/chromium/chrome'
		);
		expect(missing.ran).toEqual([]);
	});

	it('treats a file that is not executable, or no file, as missing', () => {
		const dir = mkdtempSync(path.join(tmpdir(), 'fieldbench-browser-'));
		const plain = path.join(dir, 'chromium');
		writeFileSync(plain, '', { mode: 0o644 });
		try {
			expect(thisMachine.executable(plain)).toBe(false);
			expect(thisMachine.executable(path.join(dir, 'none'))).toBe(false);
			expect(thisMachine.executable(process.execPath)).toBe(true);
		} finally {
			rmSync(dir, { recursive: true, force: true });
		}
	});
});
